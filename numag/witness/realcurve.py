"""The real points of a real algebraic curve, traced numerically between the critical points of a projection.

A curve C in R^n cut out by n - 1 real equations F (more equations are replaced by n - 1 random real
combinations, and what the combinations add is dropped by the original residual) is cut into arcs by a
generic real linear projection pi(x) = a . x, as in the published method of Lu, Bates, Sommese and
Wampler ("Finding all real points of a complex curve", Contemp. Math. 448, 2007); the construction here
is our own:

1. **Critical points**: F = 0 together with det [J_F; a] = 0 (a square system; its real solutions are the
   points where the tangent of C is orthogonal to a, and every singular point of C). Their values of pi,
   the critical values, cut the line into open intervals over which pi restricted to C has no critical
   point: every real arc over an interval is a graph over the whole interval.
2. **Fibres**: over a point m of each interval the fibre {F = 0, pi = m} is solved (a square system of
   Bezout number the product of the degrees); its real points are one point on each arc.
3. **Arcs**: from each fibre point the arc is traced both ways by pseudo-arclength continuation
   (predictor along the tangent, Newton on [F; t . (y - y_predicted)], all arcs of all intervals in one
   batch) until pi passes the interval's end, the tangent turns back (a fold) or the step stalls (a
   singular point); the arc then ends at the vertex it reached: a critical point, or a regular point of
   the fibre over the critical value. Arcs leaving the tracing region end there.

Vertices that are singular points of C (rank of J below n - 1) stay vertices; at every other vertex
exactly two arc ends meet, and :meth:`RealCurve.branches` joins arcs through them, so the branches are the
edges of the real curve's graph with the singular points as vertices, independent of the projection.

Examples
--------
>>> from numag.system.parse import parse_system
>>> curve = trace_real_curve(parse_system(["y^2 - x^2*(x + 1)"], ["x", "y"]),
...                          RealCurveOptions(box=((-2, -2), (2, 2))), seed=1)
>>> sorted(b.ends for b in curve.branches())
[('box exit', 'singular'), ('box exit', 'singular'), ('singular', 'singular')]
"""

from dataclasses import dataclass, field
import enum
import math
import time

import numpy as np

from ..errors import InputError
from ..system.display import counted
from ..system.polynomial import Polynomial, PolynomialSystem, determinant
from ..numeric.evaluate import BatchEvaluator, TermSizes
from ..numeric.seeds import random_state
from ..tracking.solve import SolveOptions, solve_system
from .cascade import jacobian_rank

__all__ = ["VertexKind", "RealCurveOptions", "RealArc", "RealBranch", "RealCurve", "trace_real_curve"]


class VertexKind(str, enum.Enum):
    """What a vertex of the real curve's graph is."""

    SINGULAR = "singular"        # rank J < n - 1: a node, a cusp, a point where branches meet
    CRITICAL = "critical"        # a smooth point where the tangent is orthogonal to the projection (a fold)
    FIBRE = "fibre"              # a regular point of the curve over a critical value
    BOX_EXIT = "box exit"        # where the arc leaves the tracing region
    UNRESOLVED = "unresolved"    # the arc stalled far from every vertex (counted as a failure)


@dataclass(frozen=True)
class RealCurveOptions:
    """Options of :func:`trace_real_curve` (defaults declared once).

    Attributes
    ----------
    box : pair of sequences, optional
        Lower and upper corners of the region of interest (one bound per unknown). Default: the real
        critical points and the ``marked`` points, padded by half their extent (at least 1).
    resolution : int
        The largest step is the box diagonal divided by this.
    tolerance : float
        Every traced point satisfies each equation to this, relative to the size of its terms.
    margin : float
        Arcs are traced in the box enlarged by this fraction of its size on every side, so that arcs
        entering the box from outside are found.
    max_steps : int
        Steps per arc before it is given up (and counted).
    """

    box: tuple = None
    resolution: int = 200
    tolerance: float = 1e-10
    margin: float = 0.5
    max_steps: int = 5000

    def validated(self, n):
        """The options, checked against ``n`` unknowns (one-line errors)."""
        if not isinstance(self.resolution, int) or not 10 <= self.resolution <= 100_000:
            raise InputError(f"the resolution must be an integer from 10 to 100000, got {self.resolution!r}")
        if not (math.isfinite(self.tolerance) and 0 < self.tolerance < 1e-3):
            raise InputError(f"the tolerance must be positive and below 1e-3, got {self.tolerance!r}")
        if self.box is not None:
            low, high = (np.asarray(corner, dtype=float) for corner in self.box)
            if low.shape != (n,) or high.shape != (n,):
                raise InputError(f"the box needs a lower and an upper bound for each of the {n} unknowns")
            if not (np.all(np.isfinite(low)) and np.all(np.isfinite(high)) and np.all(low < high)):
                raise InputError("the box's bounds must be finite, each lower bound below its upper bound")
        return self


@dataclass
class RealArc:
    """One arc of the real curve: points from vertex ``start`` to vertex ``end`` (indices into vertices)."""

    points: np.ndarray
    start: int
    end: int


@dataclass
class RealBranch:
    """Arcs joined through smooth vertices: an edge of the graph whose vertices are singular points.

    ``ends`` are the kinds of its two end vertices, sorted (empty for a closed loop of smooth points);
    ``vertices`` their indices (same order as ``points``: first and last point).
    """

    points: np.ndarray
    ends: tuple
    vertices: tuple


@dataclass
class RealCurve:
    """The traced real points of a curve (see :func:`trace_real_curve`).

    Attributes
    ----------
    system : PolynomialSystem
        The equations as given.
    projection : ndarray, shape (n,)
        The real unit vector a of pi(x) = a . x.
    critical_values : ndarray
        Sorted real critical values (intervals lie between them).
    vertices : ndarray, shape (V, n)
    vertex_kinds : list of VertexKind
    arcs : list of RealArc
    box : tuple of ndarray
        Lower and upper corners of the region of interest.
    tolerance : float
        Every traced point satisfies each equation to this, relative to its terms' size.
    failed_arcs : int
        Arcs given up (too many steps, or stalled far from every vertex).
    dropped_arcs : int
        Arcs of random combinations that are not on the curve (only with more than n - 1 equations).
    seed, seconds, notes
    """

    system: PolynomialSystem
    projection: np.ndarray
    critical_values: np.ndarray
    vertices: np.ndarray
    vertex_kinds: list
    arcs: list
    box: tuple
    tolerance: float
    failed_arcs: int
    dropped_arcs: int
    seed: int
    seconds: float
    notes: list = field(default_factory=list)

    def branches(self, clip=True):
        """The arcs joined through every smooth vertex where exactly two arc ends meet.

        Parameters
        ----------
        clip : bool, default True
            Keep only the pieces inside the box; a piece cut by the box's boundary ends at a 'box exit'.

        Returns
        -------
        list of RealBranch
        """
        branches = self._joined()
        if not clip:
            return branches
        low, high = self.box
        pieces = []
        for branch in branches:
            inside = np.all((branch.points >= low) & (branch.points <= high), axis=1)
            if np.all(inside):
                pieces.append(branch)
                continue
            # runs of consecutive points inside the box
            edges = np.diff(np.concatenate([[0], inside.astype(np.int8), [0]]))
            starts, stops = np.nonzero(edges == 1)[0], np.nonzero(edges == -1)[0]
            closed = not branch.ends
            for first, stop in zip(starts, stops):
                last = stop - 1
                ends = []
                for position, end in ((first, 0), (last, 1)):
                    at_end = position == (0 if end == 0 else len(inside) - 1)
                    if at_end and not closed:
                        vertex = self._end_vertex(branch, end)
                        ends.append((self.vertex_kinds[vertex].value, vertex))
                    else:
                        ends.append((VertexKind.BOX_EXIT.value, -1))
                ends.sort()
                pieces.append(RealBranch(branch.points[first:stop], tuple(e[0] for e in ends),
                                         tuple(e[1] for e in ends)))
        return pieces

    def _end_vertex(self, branch, end):
        """The vertex at the first (0) or last (1) point of an open branch."""
        a, b = branch.vertices
        first_is_a = np.allclose(self.vertices[a], branch.points[0]) if a >= 0 else False
        return (a if first_is_a else b) if end == 0 else (b if first_is_a else a)

    def _joined(self):
        """The branches before clipping to the box."""
        ends_at = {}
        for k, arc in enumerate(self.arcs):
            ends_at.setdefault(arc.start, []).append((k, 0))
            ends_at.setdefault(arc.end, []).append((k, 1))
        joinable = {v for v, ends in ends_at.items()
                    if len(ends) == 2 and self.vertex_kinds[v] in (VertexKind.CRITICAL, VertexKind.FIBRE)}
        used = [False] * len(self.arcs)
        branches = []

        def walk(points, arc_index, side):
            # from the end ``side`` of arc ``arc_index``, follow the chain through joinable vertices
            arc = self.arcs[arc_index]
            vertex = arc.end if side == 1 else arc.start
            while vertex in joinable:
                following = [(k, s) for k, s in ends_at[vertex] if (k, s) != (arc_index, side) and not used[k]]
                if not following:
                    break
                arc_index, entry = following[0]
                used[arc_index] = True
                arc = self.arcs[arc_index]
                points.append((arc.points if entry == 0 else arc.points[::-1])[1:])
                side = 1 - entry
                vertex = arc.end if side == 1 else arc.start
            return vertex

        for k, arc in enumerate(self.arcs):  # open chains first: from an end that is not joinable
            if used[k] or (arc.start in joinable and arc.end in joinable):
                continue
            used[k] = True
            if arc.start in joinable:
                points, first = [arc.points[::-1]], arc.end
                last = walk(points, k, 0)
            else:
                points, first = [arc.points], arc.start
                last = walk(points, k, 1)
            kinds = (self.vertex_kinds[first].value, self.vertex_kinds[last].value)
            order = sorted(range(2), key=lambda i: kinds[i])
            branches.append(RealBranch(np.vstack(points), tuple(kinds[i] for i in order),
                                       tuple((first, last)[i] for i in order)))
        for k, arc in enumerate(self.arcs):  # what is left are closed loops through smooth vertices only
            if used[k]:
                continue
            used[k] = True
            points = [arc.points]
            walk(points, k, 1)
            branches.append(RealBranch(np.vstack(points), (), ()))
        return branches

    def points(self):
        """Every traced point, shape (P, n)."""
        return np.vstack([arc.points for arc in self.arcs]) if self.arcs else np.zeros((0, len(self.projection)))


def _real_combinations(system, count, rng):
    """``count`` random real combinations of the equations (for more than n - 1 equations)."""
    weights = rng.standard_normal((count, system.n_equations))
    combined = []
    for row in weights / np.linalg.norm(weights, axis=1, keepdims=True):
        total = Polynomial.zero(system.n_variables)
        for w, p in zip(row, system.polynomials):
            total = total + p.numeric() * float(w)
        combined.append(total)
    return combined


def _null_vectors(jacobians):
    """The last right singular vector of each real (P, n - 1, n) Jacobian: the tangent of the curve."""
    return np.linalg.svd(jacobians, full_matrices=True)[2][:, -1, :]


class _Curve:
    """The working equations with their evaluator and term sizes (real points)."""

    def __init__(self, polynomials):
        self.evaluator = BatchEvaluator(polynomials)
        self.sizes = TermSizes(polynomials)

    def evaluate(self, points):
        values, jacobians = self.evaluator.evaluate(points.astype(complex))
        return values.real, jacobians.real

    def residual(self, points):
        """Largest scaled residual at each point."""
        values = self.evaluator.evaluate(points.astype(complex), jacobian=False)
        return np.max(np.abs(values) / self.sizes.values(points), axis=1)


def _newton_on_level(curve, projection, points, levels, tolerance, iterations=12):
    """Newton on [F; a . x - level] from each point; returns the points and which converged."""
    points = np.array(points, dtype=float, copy=True)
    for _ in range(iterations):
        values, jacobians = curve.evaluate(points)
        matrix = np.concatenate([jacobians, np.broadcast_to(projection, (len(points), 1, len(projection)))], axis=1)
        rhs = np.concatenate([values, (points @ projection - levels)[:, None]], axis=1)
        with np.errstate(all="ignore"):
            try:
                step = np.linalg.solve(matrix, rhs[:, :, None])[:, :, 0]
            except np.linalg.LinAlgError:
                step = np.stack([np.linalg.lstsq(m, r, rcond=None)[0] for m, r in zip(matrix, rhs)])
        step[~np.isfinite(step)] = 0.0
        points -= step
    level_error = np.abs(points @ projection - levels) <= 1e-12 * (1 + np.abs(levels))
    good = np.all(np.isfinite(points), axis=1)
    converged = np.zeros(len(points), dtype=bool)
    converged[good] = (curve.residual(points[good]) <= tolerance) & level_error[good]
    return points, converged


def _solve_real(system, seed):
    """The finite real isolated solutions of a square system (real parts), and whether any were not isolated."""
    result = solve_system(system, SolveOptions(), seed=seed)
    points = [s.point.real for s in result.solutions if s.real]
    real_points = np.array(points, dtype=float).reshape(-1, system.n_variables)
    return real_points, bool(result.not_isolated), result


def _default_box(points, n):
    """A cube around the critical and marked points: a bounded branch reaches as far across the projection as
    along it (a circle's critical points lie on one diameter), so every side gets the largest extent."""
    if len(points) == 0:
        return np.full(n, -2.0), np.full(n, 2.0)
    low, high = points.min(axis=0), points.max(axis=0)
    centre = 0.5 * (low + high)
    half = max(0.75 * float(np.max(high - low)), 1.0)
    return centre - half, centre + half


def _cluster(points, radius):
    """Labels of points within ``radius`` of each other (single linkage, small sets)."""
    labels = -np.ones(len(points), dtype=np.int64)
    count = 0
    for k in range(len(points)):
        if labels[k] >= 0:
            continue
        labels[k] = count
        stack = [k]
        while stack:
            i = stack.pop()
            near = np.nonzero((np.linalg.norm(points - points[i], axis=1) <= radius) & (labels < 0))[0]
            labels[near] = count
            stack.extend(near.tolist())
        count += 1
    return labels


def trace_real_curve(system, options=None, seed=None, marked=(), constraints=()):
    """Trace the real points of a real curve between the critical points of a random projection.

    Parameters
    ----------
    system : PolynomialSystem
        Affine, real coefficients, at least n - 1 equations in n >= 2 unknowns, cutting out a curve
        (more equations are replaced by n - 1 random real combinations; traced arcs off the curve are
        dropped by the residual of every equation).
    options : RealCurveOptions, optional
    seed : int, optional
        Seed of the projection, the combinations and the homotopies.
    marked : array_like, shape (K, n), optional
        Known singular points (a report's): vertices near them take their coordinates.
    constraints : sequence of Polynomial, optional
        Equations the drawn curve must also satisfy: arcs of ``system`` off them are dropped (the
        singular curves of a surface f = 0 are traced as V(df) with the constraint f).

    Returns
    -------
    RealCurve

    Raises
    ------
    InputError
        Projective or complex input, too few equations, or a positive-dimensional set of critical
        points (the equations do not cut out a reduced curve).

    Examples
    --------
    >>> from numag.system.parse import parse_system
    >>> curve = trace_real_curve(parse_system(["x^2 + y^2 - 1"], ["x", "y"]), seed=2)
    >>> len(curve.branches()), bool(abs(np.linalg.norm(curve.points(), axis=1) - 1).max() < 1e-9)
    (1, True)
    """
    started = time.perf_counter()
    n = system.n_variables
    options = (options or RealCurveOptions()).validated(n)
    if system.projective:
        raise InputError("real curves are traced for affine systems only (write a projective one in a chart)")
    if not system.has_real_coefficients:
        raise InputError("real curves are traced for equations with real coefficients only")
    if n < 2 or system.n_equations < n - 1:
        raise InputError(f"{counted(system.n_equations, 'equation')} in {counted(n, 'unknown')} do not cut out a curve "
                         f"(n - 1 = {n - 1} equations are needed)")
    seed, rng = random_state(seed)
    notes = []
    original = _Curve([p.numeric() for p in list(system.polynomials) + list(constraints)])
    squared = system.n_equations > n - 1 or len(constraints) > 0
    working_polynomials = (_real_combinations(system, n - 1, rng) if squared
                           else [p.numeric() for p in system.polynomials])
    curve = _Curve(working_polynomials)
    projection = rng.standard_normal(n)
    projection /= np.linalg.norm(projection)

    # 1. critical points: F = 0 and det [J; a] = 0
    gradients = [p.gradient() for p in working_polynomials]
    constants = [Polynomial.constant(float(a), n) for a in projection]
    critical_equation = determinant([list(row) for row in gradients] + [constants])
    if critical_equation.is_zero():
        raise InputError("the projection is critical everywhere: the equations do not cut out a reduced curve")
    if critical_equation.degree < 1:  # a nonzero constant: a line has no critical point
        critical, not_isolated = np.zeros((0, n)), False
    else:
        critical_system = PolynomialSystem(system.variables, working_polynomials + [critical_equation])
        critical, not_isolated, _ = _solve_real(critical_system, int(rng.integers(2 ** 31)))
    if not_isolated:
        raise InputError("the critical points of the projection form a positive-dimensional set: the equations "
                         "do not cut out a reduced curve (a multiple or singular component?)")
    if len(critical):
        critical = critical[original.residual(critical) <= 1e-6]
    marked = np.asarray(marked, dtype=float).reshape(-1, n)
    low, high = ((np.asarray(options.box[0], float), np.asarray(options.box[1], float)) if options.box is not None
                 else _default_box(np.vstack([critical, marked]), n))
    diagonal = float(np.linalg.norm(high - low))
    extent = high - low
    region = (low - options.margin * extent, high + options.margin * extent)
    step_max = diagonal / options.resolution
    step_min = 1e-9 * diagonal

    # marked singular points replace the critical points near them: they are known more accurately, and
    # a singular point of multiplicity k in the critical system is found only to about eps^(1/k)
    if len(marked):
        for point in marked:
            if len(critical):
                near = np.linalg.norm(critical - point, axis=1) <= 1e-3 * diagonal
                critical = critical[~near]
            critical = np.vstack([critical, point[None, :]])
    if len(critical):
        # a singular point is a multiple solution of the critical system, found only to about eps^(1/k):
        # its copies are one vertex (distinct critical points of a random projection are rarely this close)
        labels = _cluster(critical, 1e-4 * diagonal)
        critical = np.array([critical[labels == k][0] for k in range(labels.max() + 1)])
    values = np.sort(critical @ projection) if len(critical) else np.zeros(0)
    # critical values this close are one (two critical points in one fibre of a random projection)
    distinct = []
    for v in values:
        if not distinct or v - distinct[-1] > 1e-9 * max(diagonal, 1.0):
            distinct.append(float(v))
    values = np.array(distinct)

    # 2. one fibre per interval
    span = float(np.abs(projection) @ (region[1] - region[0]))
    centre = float(projection @ (0.5 * (region[0] + region[1])))
    if len(values) == 0:
        bounds, samples = [(-np.inf, np.inf)], [centre]
    else:
        bounds = [(-np.inf, values[0])] + list(zip(values[:-1], values[1:])) + [(values[-1], np.inf)]
        # an unbounded interval is sampled near its end, where its arcs are still inside the region
        samples = [values[0] - 0.01 * span] + [0.5 * (a + b) for a, b in zip(values[:-1], values[1:])] + \
                  [values[-1] + 0.01 * span]
    starts, lows, highs = [], [], []
    reach = (centre - 0.5 * span, centre + 0.5 * span)  # the values of pi on the region
    for (lower, upper), m in zip(bounds, samples):
        fibre_seed = int(rng.integers(2 ** 31))
        if not reach[0] <= m <= reach[1]:
            # a sample beyond the region's values of pi (a far critical value) finds arcs that never enter it;
            # an arc is a graph over its whole interval, so any value of the interval inside the reach will do
            inside = (max(lower, reach[0]), min(upper, reach[1]))
            if inside[0] >= inside[1]:
                continue  # no arc over this interval meets the region
            m = 0.5 * (inside[0] + inside[1])
        fibre_system = PolynomialSystem(system.variables, working_polynomials + [Polynomial.linear(projection, -float(m))])
        points, _, _ = _solve_real(fibre_system, fibre_seed)
        if len(points) == 0:
            continue
        points, converged = _newton_on_level(curve, projection, points, np.full(len(points), m), options.tolerance)
        for p in points[converged]:
            starts.append(p)
            lows.append(lower)
            highs.append(upper)
        if np.any(~converged):
            notes.append(f"{counted(int(np.sum(~converged)), 'real fibre point')} over {m:.6g} did not refine onto the "
                         "curve and were not traced")
    starts = np.array(starts, dtype=float).reshape(-1, n)

    # 3. every arc both ways, all at once
    count = len(starts)
    origin = np.concatenate([starts, starts])
    direction = np.concatenate([np.ones(count), -np.ones(count)])
    goal = np.concatenate([np.array(highs), np.array(lows)]) if count else np.zeros(0)
    # arcs starting outside the region are traced until they leave a wider one, or enter the region and leave it
    outer = (low - 3 * extent, high + 3 * extent)
    traced, reason = _track_arcs(curve, projection, origin, direction, goal, (region, outer), step_max, step_min,
                                 options.tolerance, options.max_steps)

    # 4. ends: vertices
    vertices = [p for p in critical]
    kinds = [None] * len(vertices)
    end_vertex = np.full(2 * count, -1, dtype=np.int64)
    fibre_ends = []
    for k in range(2 * count):
        last = traced[k][-1]
        if reason[k] == _Stop.EXIT:
            vertices.append(last)
            kinds.append(VertexKind.BOX_EXIT)
            end_vertex[k] = len(vertices) - 1
            continue
        if reason[k] == _Stop.STEPS:
            vertices.append(last)
            kinds.append(VertexKind.UNRESOLVED)
            end_vertex[k] = len(vertices) - 1
            continue
        fibre_ends.append(k)
    if fibre_ends:
        ends = np.array([traced[k][-1] for k in fibre_ends])
        on_level, converged = _newton_on_level(curve, projection, ends, goal[fibre_ends], options.tolerance)
        for j, k in enumerate(fibre_ends):
            at_goal = np.abs(critical @ projection - goal[k]) <= 1e-9 * max(diagonal, 1.0) if len(critical) else []
            candidates = np.nonzero(at_goal)[0]
            # a fold or a singular point stops the arc within a few steps of it (Newton on the fibre
            # converges badly there); a regular crossing lands on the fibre by Newton
            landed = reason[k] == _Stop.CROSSED and bool(converged[j]) and \
                np.linalg.norm(on_level[j] - ends[j]) <= 2 * step_max
            reference = on_level[j] if landed else ends[j]
            if len(candidates):
                distance = np.linalg.norm(critical[candidates] - reference, axis=1)
                if distance.min() <= (1e-3 * diagonal if landed else 4 * step_max):
                    end_vertex[k] = candidates[int(np.argmin(distance))]
                    continue
            vertices.append(reference)
            kinds.append(VertexKind.FIBRE if landed else VertexKind.UNRESOLVED)
            end_vertex[k] = len(vertices) - 1
    vertices = np.array(vertices, dtype=float).reshape(-1, n)
    # regular fibre points reached from both sides are one vertex
    fibre = [v for v in range(len(vertices)) if kinds[v] == VertexKind.FIBRE]
    if fibre:
        labels = _cluster(vertices[fibre], 1e-7 * diagonal)
        first = {}
        for v, label in zip(fibre, labels):
            first.setdefault(int(label), v)
        remap = {v: first[int(label)] for v, label in zip(fibre, labels)}
        end_vertex = np.array([remap.get(int(v), int(v)) for v in end_vertex], dtype=np.int64)
    if len(critical):
        ranks = jacobian_rank(original.evaluator, original.sizes, critical.astype(complex), 1e-6)
        singular = ranks < n - 1
        if len(marked):
            near_marked = np.array([np.min(np.linalg.norm(marked - p, axis=1)) <= 1e-7 * diagonal for p in critical])
            singular |= near_marked
        for v in range(len(critical)):
            kinds[v] = VertexKind.SINGULAR if singular[v] else VertexKind.CRITICAL

    # 5. arcs: down half reversed, then the up half; each ends at its vertex
    arcs, failed, dropped = [], 0, 0
    for k in range(count):
        up, down = traced[k], traced[count + k]
        start_v, end_v = int(end_vertex[count + k]), int(end_vertex[k])
        body = [down[::-1], up[1:]]
        pieces = ([vertices[start_v][None, :]] if reason[count + k] != _Stop.EXIT else []) + body + \
                 ([vertices[end_v][None, :]] if reason[k] != _Stop.EXIT else [])
        points = np.vstack(pieces)
        if squared and original.residual(starts[k][None, :])[0] > 1e-6:
            dropped += 1
            continue
        if not np.any(np.all((points >= region[0]) & (points <= region[1]), axis=1)):
            continue  # traced outside the region only (arcs entering it from outside were the aim)
        failed += int(kinds[start_v] == VertexKind.UNRESOLVED) + int(kinds[end_v] == VertexKind.UNRESOLVED)
        arcs.append(RealArc(points, start_v, end_v))
    if failed:
        notes.append(f"{counted(failed, 'arc end')} stalled far from every vertex or took more than "
                     f"{options.max_steps} steps: the picture may miss or misjoin a piece of the curve there")
    # a smooth vertex in the box where other than two arc ends meet: the arcs were misjoined there
    ends = np.bincount([v for arc in arcs for v in (arc.start, arc.end)], minlength=len(vertices))
    in_box = np.all((vertices >= low) & (vertices <= high), axis=1) if len(vertices) else np.zeros(0, dtype=bool)
    misjoined = sum(1 for v in range(len(vertices)) if in_box[v] and kinds[v] in (VertexKind.CRITICAL, VertexKind.FIBRE)
                    and ends[v] not in (0, 2))  # 0: a duplicate merged into another vertex, or unreached
    if misjoined:
        failed += misjoined
        notes.append(f"{counted(misjoined, 'smooth vertex', 'smooth vertices')} in the box where other than two "
                     "arcs meet: arcs were misjoined near a singular point or a tight fold (try another --seed)")
    return RealCurve(system, projection, values, vertices, kinds, arcs, (low, high), options.tolerance, failed,
                     dropped, seed, time.perf_counter() - started, notes)


class _Stop(enum.IntEnum):
    """Why the tracking of a half-arc stopped."""

    RUNNING = 0
    CROSSED = 1   # pi passed the end of the interval (a regular fibre point, a node)
    FOLD = 2      # the tangent turned back against the projection (a fold point)
    STALLED = 3   # the step fell below its minimum (near a singular point)
    EXIT = 4      # left the tracing region
    STEPS = 5     # too many steps


def _track_arcs(curve, projection, origin, direction, goal, regions, step_max, step_min, tolerance, max_steps):
    """Pseudo-arclength continuation of every half-arc at once.

    ``regions`` is (region, outer): a half-arc stops when it leaves the region after having been in it,
    or when it leaves the outer region.

    Returns the list of traced point arrays (the origin first; the point that crossed the end of the
    interval is not kept) and the reason each stopped (:class:`_Stop`).
    """
    count, n = origin.shape if origin.size else (0, len(projection))
    paths = [[p.copy()] for p in origin]
    reason = np.full(count, _Stop.RUNNING, dtype=np.int64)
    if count == 0:
        return [np.array(p) for p in paths], reason
    region, outer = regions

    def within(points, corners):
        return np.all((points >= corners[0]) & (points <= corners[1]), axis=-1)

    was_inside = within(origin, region)
    x = origin.copy()
    _, jacobians = curve.evaluate(x)
    tangent = _null_vectors(jacobians)
    tangent *= np.sign(tangent @ projection * direction)[:, None]
    step = np.full(count, 0.25 * step_max)
    steps = np.zeros(count, dtype=np.int64)
    active = np.ones(count, dtype=bool)
    while np.any(active):
        index = np.nonzero(active)[0]
        t = tangent[index]
        predicted = x[index] + step[index, None] * t
        y = predicted.copy()
        first_correction = None
        for _ in range(4):
            values, jacobians = curve.evaluate(y)
            matrix = np.concatenate([jacobians, t[:, None, :]], axis=1)
            rhs = np.concatenate([values, np.sum(t * (y - predicted), axis=1)[:, None]], axis=1)
            with np.errstate(all="ignore"):
                try:
                    correction = np.linalg.solve(matrix, rhs[:, :, None])[:, :, 0]
                except np.linalg.LinAlgError:
                    correction = np.stack([np.linalg.lstsq(m, r, rcond=None)[0] for m, r in zip(matrix, rhs)])
            correction[~np.isfinite(correction)] = np.inf
            if first_correction is None:
                first_correction = np.linalg.norm(correction, axis=1)
            y = y - correction
        finite = np.all(np.isfinite(y), axis=1)
        residual = np.full(len(index), np.inf)
        residual[finite] = curve.residual(y[finite])
        new_tangent = np.zeros_like(t)
        if np.any(finite):
            new_tangent[finite] = _null_vectors(curve.evaluate(y[finite])[1])
        new_tangent *= np.where(np.sum(new_tangent * t, axis=1) < 0, -1.0, 1.0)[:, None]
        # accept: on the curve, a first Newton correction small against the step (no jump to another
        # branch), and a tangent that turned by less than about 25 degrees
        accept = finite & (residual <= tolerance) & (first_correction <= 0.5 * step[index]) & \
            (np.sum(new_tangent * t, axis=1) >= 0.9)
        for j in np.nonzero(accept)[0]:
            k = index[j]
            level = y[j] @ projection
            if direction[k] * (level - goal[k]) >= 0:
                reason[k] = _Stop.CROSSED
                continue
            if direction[k] * (new_tangent[j] @ projection) <= 0:
                reason[k] = _Stop.FOLD  # the point is past the fold: the arc ends at the fold itself
                continue
            paths[k].append(y[j].copy())
            inside = within(y[j], region)
            if (was_inside[k] and not inside) or not within(y[j], outer):
                reason[k] = _Stop.EXIT
            was_inside[k] |= inside
        moved = index[accept]
        x[moved] = y[accept]
        tangent[moved] = new_tangent[accept]
        step[moved] = np.minimum(1.5 * step[moved], step_max)
        rejected = index[~accept]
        step[rejected] *= 0.5
        reason[rejected[step[rejected] < step_min]] = _Stop.STALLED
        steps[index] += 1
        reason[index[(steps[index] >= max_steps) & (reason[index] == _Stop.RUNNING)]] = _Stop.STEPS
        active = reason == _Stop.RUNNING
    return [np.array(p) for p in paths], reason
