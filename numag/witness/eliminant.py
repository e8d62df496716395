"""The points where a curve meets a hypersurface, by the evaluated eliminant along a generic projection.

With l a generic linear form and C a curve of degree d with its witness set on l = t, the function
R(t) = prod over the fibre points x_i(t) of g(x_i(t)) is a symmetric function of the fibre, so a polynomial in t
of degree at most d * deg g (the projection of C by a generic l is proper). Its roots are the values of l at the
points of C on V(g). R is sampled by moving the fibre along a circle of t values (points of C over it are finite
and, for a generic circle, no branch point lies on it), interpolated by the FFT on the circle, and its roots are
taken back to points of C, each refined by Newton's method on the curve's held rows and g.

No path goes to infinity: a zero of R at infinity (a point of C at infinity on V(g)) shows only as a small leading
coefficient, and a root far out is taken only where Newton's method confirms a point there.

Examples
--------
>>> from numag.system.parse import parse_system
>>> circle = [p.numeric() for p in parse_system(["x^2 + y^2 - 1"], ["x", "y"]).polynomials]
>>> on_line = np.array([[0.6, 0.8], [0.6, -0.8]])             # the circle's points on x = 0.6
>>> line = parse_system(["y"], ["x", "y"]).polynomials[0].numeric()
>>> meeting = curve_meets_hypersurface(circle, on_line, line, np.random.default_rng(0))
>>> sorted(np.round(meeting.points[:, 0].real, 8).tolist()), meeting.undecided
([-1.0, 1.0], 0)
"""

from dataclasses import dataclass, field, replace
import math

import numpy as np

from ..numeric.evaluate import BatchEvaluator, TermSizes
from ..system.display import counted
from ..system.polynomial import PolynomialSystem
from ..tracking.service import PathCounts
from .cascade import WitnessOptions, held_parts, linear_form, track_moves
from .decompose import holding_rows

__all__ = ["CurveMeeting", "MatrixDeterminant", "curve_meets_hypersurface"]

#: Samples per degree of freedom of R: the coefficients above R's degree bound measure the sampling's own error.
_OVERSAMPLING = 2
#: A coefficient of R is nonzero when it exceeds the sampling's error by this factor.
_ABOVE_NOISE = 100.0
#: Roots of R are one multiple root while they lie within this times the spread the sampling's error gives it.
_SPREAD_FACTOR = 4.0
#: A root whose own location error (relative to 1 + |s|) exceeds this is undecided.
_LOCATED = 1e-8
#: R's coefficients beyond its degree above this share of its largest: the samples are inconsistent.
_CONSISTENT = 1e-6
#: S at a root below this share of its terms: two fibre points meet V(g) there, Q / S tells no point.
_SEPARATE = 1e-8
#: The point read off a root must meet the curve's held rows to this (residual over the size of their terms).
_ON_CURVE = 1e-6


@dataclass
class CurveMeeting:
    """The points where a curve meets a hypersurface (:func:`curve_meets_hypersurface`).

    Attributes
    ----------
    points : ndarray, shape (m, n)
        Distinct points, refined.
    paths : PathCounts
        Every path tracked (the fibre moved along the circle and to the roots).
    undecided : int
        Roots of R that neither refined to a point nor could be told apart from a zero at infinity or noise.
    notes : list of str
    """

    points: np.ndarray
    paths: PathCounts
    undecided: int = 0
    notes: list = field(default_factory=list)


class MatrixDeterminant:
    """g = det M(x) for a square matrix M of polynomials, evaluated as the determinant of M's values (never
    expanded: the expansion's terms cancel along a curve where g is small, and its rounding is what limits R).

    Parameters
    ----------
    entries : list of list of Polynomial
        Affine numeric polynomials, k x k.

    Examples
    --------
    >>> from numag.system.parse import parse_system
    >>> p = [q.numeric() for q in parse_system(["x", "y", "1", "x"], ["x", "y"]).polynomials]
    >>> g = MatrixDeterminant([[p[0], p[1]], [p[2], p[3]]])    # x^2 - y
    >>> g.degree, g.evaluate(np.array([[3.0, 2.0]])).real.tolist()
    (2, [7.0])
    """

    def __init__(self, entries):
        self.size = len(entries)
        flat = [q.numeric() for row in entries for q in row]
        self.n_variables = flat[0].n_variables
        self.degree = int(sum(max(max(q.degree, 0) for q in row) for row in entries))
        self._evaluator, self._sizes = BatchEvaluator(flat), TermSizes(flat)

    def evaluate(self, points):
        """det M at each point, shape (P,)."""
        points = np.atleast_2d(points)
        values = self._evaluator.evaluate(points, jacobian=False).reshape(len(points), self.size, self.size)
        return np.linalg.det(values)

    def sizes(self, points):
        """A size of g's terms at each point (the product of each row's largest entry size), shape (P,)."""
        points = np.atleast_2d(points)
        values = self._sizes.values(points).reshape(len(points), self.size, self.size)
        return np.prod(np.max(values, axis=2), axis=1)


class _PolynomialFunction:
    """A polynomial g with the interface of :class:`MatrixDeterminant`."""

    def __init__(self, polynomial):
        self.degree = max(polynomial.degree, 0)
        self._evaluator, self._sizes = BatchEvaluator([polynomial]), TermSizes([polynomial])

    def evaluate(self, points):
        return self._evaluator.evaluate(np.atleast_2d(points), jacobian=False)[:, 0]

    def sizes(self, points):
        return self._sizes.values(np.atleast_2d(points))[:, 0]


class _Fibre:
    """The curve's points over l = t, moved between values of t on the curve's held rows."""

    def __init__(self, curve_equations, witness_points, rng, options):
        self.rng, self.options = rng, options
        points = np.atleast_2d(np.asarray(witness_points, dtype=complex))
        self.n = points.shape[1]
        held = holding_rows(PolynomialSystem([f"x{j}" for j in range(self.n)], list(curve_equations)), self.n - 1,
                            points, rng, options.rank_threshold)
        self.rows, self.block = held_parts(held.combined(self.n - 1, rng))
        # the hyperplane through the witness points: a random one of those through them (any one not containing
        # the curve meets it in exactly these d points, since there are d of them); l is its linear part
        affine = np.hstack([np.ones((len(points), 1)), points])
        _, _, right = np.linalg.svd(affine)
        through = right[len(points):].conj() if len(points) < self.n + 1 else right[-1:].conj()
        plane = (rng.standard_normal(len(through)) + 1j * rng.standard_normal(len(through))) @ through
        self.paths = PathCounts()
        # the tracker that moves the witness points elsewhere (no rescue: a lost point is counted and re-tracked)
        self.tracker = replace(options.tracker, rescue_digits=0, endgame_if_settled=False)
        # l drawn afresh, through the witness points' mean: the witness hyperplane fixes l on the span of the
        # curve (a plane curve in C^3 would always be projected along the line through its witness points)
        form = rng.standard_normal(self.n) + 1j * rng.standard_normal(self.n)
        form = form / np.linalg.norm(form)
        t = complex(form @ np.mean(points, axis=0))
        moved = track_moves(self.rows + [linear_form(plane)], self.rows + [linear_form(np.concatenate([[-t], form]))],
                            points, rng, self.tracker, options.batch_size, held=self.block)
        self.paths += moved.counts
        self.form, self.t0 = form, t
        self.points = moved.affine_endpoints()
        self.complete = bool(np.all(np.isfinite(self.points)))

    def _plane(self, t):
        return linear_form(np.concatenate([[-t], self.form]))

    def move(self, points, t_from, t_to):
        """The fibre over ``t_from`` moved to ``t_to`` (NaN rows where a path failed)."""
        run = track_moves(self.rows + [self._plane(t_from)], self.rows + [self._plane(t_to)], points, self.rng,
                          self.tracker, self.options.batch_size, held=self.block)
        self.paths += run.counts
        return run.affine_endpoints()

    def refined(self, points, t, steps=3):
        """Fibre points over t refined by Newton's method on the held rows and l = t (a square system, regular
        away from the projection's branch points): the samples of R then carry rounding only."""
        points = np.array(points, dtype=complex)
        for i, x in enumerate(points):
            for _ in range(steps):
                values, gradients = self.held(x)
                residual = np.concatenate([values, [self.form @ x - t]])
                x = x + np.linalg.lstsq(np.vstack([gradients, self.form]), -residual, rcond=None)[0]
            points[i] = x
        return points

    def held(self, x):
        """Values (n - 1,) and gradients (n - 1, n) of the held rows at the affine point x."""
        point = np.concatenate([[1.0], x])[None, :]
        if self.block is not None:
            values, gradients = self.block.evaluate(point)
            return values[0], gradients[0][:, 1:]
        evaluator = BatchEvaluator(self.rows)
        values, gradients = evaluator.evaluate(point)
        return values[0], gradients[0][:, 1:]

    def held_sizes(self, x):
        """Term sizes of the held rows at x (n - 1,)."""
        point = np.concatenate([[1.0], x])[None, :]
        if self.block is not None:
            return self.block.values(point)[0]
        return TermSizes(self.rows, homogenized=True).values(point)[0]


def curve_meets_hypersurface(curve_equations, witness_points, hypersurface, rng, options=None):
    """The points where a curve meets the hypersurface V(g), from the curve's witness points, with no path to
    infinity (the evaluated eliminant along a generic projection; see the module).

    Parameters
    ----------
    curve_equations : list of Polynomial
        Affine numeric polynomials; the curve is a component of their zeros (deflated here where they lose rank
        along it).
    witness_points : ndarray, shape (deg, n)
        All the curve's points on one hyperplane.
    hypersurface : Polynomial or MatrixDeterminant
        g, affine numeric.
    rng : numpy.random.Generator
    options : WitnessOptions, optional

    Returns
    -------
    CurveMeeting

    Examples
    --------
    >>> from numag.system.parse import parse_system
    >>> parabola = [p.numeric() for p in parse_system(["y - x^2", "z - 1"], ["x", "y", "z"]).polynomials]
    >>> on_plane = np.array([[2.0, 4.0, 1.0], [-2.0, 4.0, 1.0]])   # on y = 4
    >>> g = parse_system(["y - x - 2"], ["x", "y", "z"]).polynomials[0].numeric()   # meets at x = -1, x = 2
    >>> meeting = curve_meets_hypersurface(parabola, on_plane, g, np.random.default_rng(3))
    >>> sorted(np.round(meeting.points[:, 0].real, 8).tolist())
    [-1.0, 2.0]
    """
    options = options or WitnessOptions()
    fibre = _Fibre(curve_equations, witness_points, rng, options)
    g = hypersurface if isinstance(hypersurface, MatrixDeterminant) else _PolynomialFunction(hypersurface.numeric())
    bound = len(fibre.points) * g.degree   # R's degree at most
    notes = []
    if not fibre.complete:
        notes.append("the curve's witness points were lost on their way to a random hyperplane")
        return CurveMeeting(np.zeros((0, fibre.n), dtype=complex), fibre.paths, 1, notes)
    if bound == 0:
        return CurveMeeting(np.zeros((0, fibre.n), dtype=complex), fibre.paths, 0, notes)
    # the circle: centred at the witness fibre's value, of the fibre's extent (its points' spread, or for a line
    # the size of its point): only scale-free quantities of the curve itself
    spread = max((np.linalg.norm(a - b) for a in fibre.points for b in fibre.points), default=0.0)
    radius = spread if spread > 0 else 1.0 + float(np.linalg.norm(fibre.points[0]))
    readings, failure = _circle_pass(fibre, g, fibre.t0, radius, bound, notes)
    if failure:
        return CurveMeeting(np.zeros((0, fibre.n), dtype=complex), fibre.paths, 1, notes)
    located = [r for r in readings if not r.unlocated and r.size == 1]
    for reading in [r for r in readings if r.unlocated or r.size > 1]:
        # A multiple root "located" is zoomed onto too: roots closer than the sampling error's m-th root merge into
        # one m-fold root at their mean (x = 2.99, 3, 3.01 on a parabola read from x = +-20: one point at 3.00001,
        # exit 0; decision 0123); a true multiple root stays one on the zoomed circle
        zoomed = _zoomed(fibre, g, reading, readings, radius, bound, notes, _ZOOM_LEVELS)
        if zoomed is None:
            return CurveMeeting(np.zeros((0, fibre.n), dtype=complex), fibre.paths, 1, notes)
        located.extend(zoomed)
    readings = located
    found, undecided = [], 0
    for reading in readings:
        if reading.point is None:
            undecided += reading.size
            notes.append(reading.note)
        else:
            found.append(reading.point)
    points = np.array(_distinct(np.array(found).reshape(-1, fibre.n), 1.0, 1e-6), dtype=complex).reshape(-1, fibre.n)
    return CurveMeeting(points, fibre.paths, undecided, list(dict.fromkeys(notes)))


def _zoomed(fibre, g, reading, readings, radius, bound, notes, levels):
    """The readings that replace a cluster ``reading`` of a pass on a circle of ``radius`` (among ``readings``), from
    circles zoomed onto it; None where the first zoomed pass fails.

    Roots close together against the circle are located poorly (R' small at each): a circle zoomed onto the cluster,
    of twice its distance to the nearest other root (a tenth of the circle where there is none), separates it, and
    its readings replace it. A reading of that pass still not located is a cluster of the zoomed circle's scale and
    is zoomed onto again, up to ``levels`` passes deep (the same rule at every scale; the carried umbrella's five
    roots near its pinch point read from a circle 10 times wider than they are apart came back unlocated after one
    zoom). What the last level leaves unlocated is undecided, never guessed. A located multiple root is not zoomed
    onto again: it stayed one root on a circle that would have split it.
    """
    others = [abs(r.t - reading.t) for r in readings if r is not reading]
    zoom = 2.0 * min(others) if others and min(others) > 0 else 0.1 * radius
    notes.append(f"{counted(reading.size, 'root')} of the eliminant located again on a circle {zoom / radius:.1e} "
                 "times the last")
    again, failure = _circle_pass(fibre, g, reading.t, zoom, bound, notes)
    if failure or not again:
        return None
    kept = _relocated(reading, again)
    if levels <= 1:
        return kept
    replaced = []
    for candidate in kept:
        deeper = _zoomed(fibre, g, candidate, again, zoom, bound, notes, levels - 1) if candidate.unlocated else None
        replaced.extend([candidate] if deeper is None else deeper)  # a deeper pass that fails leaves it undecided
    return replaced


#: Circles zoomed onto a cluster of the eliminant's roots, one inside the other, before it is left undecided.
_ZOOM_LEVELS = 3


def _relocated(reading, again):
    """The readings of a zoomed pass that replace an unlocated cluster of ``reading.size`` roots: the nearest ones
    whose sizes add up to it (decision 0123), or the cluster left undecided when the nearest ones do not.

    The zoomed circle separates the cluster's roots; keeping only the nearest reading dropped the others: five roots
    of the carried umbrella's eliminant, one the pinch point, read as one cluster and then as 2 + 2 + 1, kept one
    double root and lost the pinch point (exit 0).

    Examples
    --------
    >>> cluster = _Reading(0j, 3, unlocated=True)
    >>> [r.size for r in _relocated(cluster, [_Reading(0.1 + 0j, 2), _Reading(5.0 + 0j, 1), _Reading(-0.2 + 0j, 1)])]
    [2, 1]
    >>> [r.point for r in _relocated(cluster, [_Reading(0.1 + 0j, 2), _Reading(0.2 + 0j, 2)])]
    [None]
    """
    kept, total = [], 0
    for candidate in sorted(again, key=lambda r: abs(r.t - reading.t)):
        if total >= reading.size:
            break
        kept.append(candidate)
        total += candidate.size
    if total != reading.size:
        return [_Reading(reading.t, reading.size, None, f"{counted(reading.size, 'root')} of the eliminant located "
                         f"again as {counted(total, 'root')} nearby")]
    return kept


@dataclass
class _Reading:
    """A root of R taken back to the curve: its t, its multiplicity, the point (None: undecided, why in note)."""

    t: complex
    size: int
    point: np.ndarray | None = None
    note: str = ""
    unlocated: bool = False


def _circle_pass(fibre, g, centre, radius, bound, notes):
    """R, S and Q sampled on the circle |t - centre| = radius and their roots read: (readings, failed)."""
    degree = len(fibre.points)
    samples = 1 << int(np.ceil(np.log2(_OVERSAMPLING * (bound + 1))))
    ts = centre + radius * np.exp(2j * np.pi * np.arange(samples) / samples)
    fibres = np.full((samples, degree, fibre.n), np.nan, dtype=complex)
    current, t_current = fibre.points, fibre.t0
    for k, t in enumerate(ts):
        moved = fibre.move(current, t_current, t)
        if not np.all(np.isfinite(moved)):   # a path lost: the fibre moved afresh from the witness points
            moved = fibre.move(fibre.points, fibre.t0, t)
        if not np.all(np.isfinite(moved)) or len(_distinct(moved, radius)) < degree:
            notes.append(f"the curve's fibre over a sample of the circle was not complete ({k} of {samples})")
            return [], True
        moved = fibre.refined(moved, t)
        fibres[k], current, t_current = moved, moved, t
    values = g.evaluate(fibres.reshape(-1, fibre.n)).reshape(samples, degree)
    # each fibre point's g over the size of its terms at a common scale: the product neither overflows nor
    # depends on g's units
    scale = np.exp(np.mean(np.log(np.maximum(g.sizes(fibres.reshape(-1, fibre.n)), 1e-300))))
    values = values / scale
    # R = prod_i g_i; S = sum_i prod_(k != i) g_k and Q_j = sum_i x_ij prod_(k != i) g_k (the coefficient of e in
    # R for g + e x_j: degree at most the same bound). Where one fibre point x_i has g = 0, S = prod_(k != i) g_k
    # and x_i = Q / S: the point is read off the samples, with no path to it (where C's held rows may lose rank)
    others = np.stack([np.prod(np.delete(values, i, axis=1), axis=1) for i in range(degree)], axis=1)
    products = np.prod(values, axis=1)
    coefficients = np.fft.fft(products) / samples    # R(t0 + radius s) = sum_j coefficients[j] s^j
    weights = np.fft.fft(np.sum(others, axis=1)) / samples
    sums = np.fft.fft(np.einsum("ki,kij->kj", others, fibres), axis=0) / samples
    largest = float(np.max(np.abs(coefficients)))
    # above the degree bound R has no coefficients: what is there is the sampling's own error (rounding, a fibre
    # point on the wrong sheet), the floor every other coefficient is judged against
    noise = float(np.max(np.abs(coefficients[bound + 1:]), initial=0.0))
    if largest == 0.0:
        notes.append("g vanishes on the whole curve")
        return [], True
    if noise > _CONSISTENT * largest:
        notes.append(f"the eliminant's samples are inconsistent (coefficients beyond its degree {noise / largest:.1e} "
                     "of its largest)")
        return [], True
    # coefficients within the sampling's error of zero are zero: R's degree falls short of the bound by the
    # points of C at infinity on V(g) (a zero at infinity shows only as a small leading coefficient)
    floor = max(noise, 1e-15 * largest)
    above = np.nonzero(np.abs(coefficients[:bound + 1]) > _ABOVE_NOISE * floor)[0]
    top = int(above.max())
    if bound > top:
        notes.append(f"the eliminant has degree {top} of at most {bound}: {bound - top} meetings at infinity not "
                     "searched")
    roots = np.roots(coefficients[:top + 1][::-1]) if top > 0 else np.zeros(0, dtype=complex)
    readings = []
    polyval = np.polynomial.polynomial.polyval
    for root, size, located in _clusters(coefficients[:top + 1], roots, floor):
        t = centre + radius * root
        if not located:
            readings.append(_Reading(t, size, None, f"{counted(size, 'root')} of the eliminant not located to the "
                                     "sampling's error", unlocated=True))
            continue
        weight = polyval(root, weights[:bound + 1])
        reach = float(np.sum(np.abs(weights[:bound + 1]) * max(abs(root), 1.0) ** np.arange(bound + 1)))
        if abs(weight) <= _SEPARATE * reach:
            readings.append(_Reading(t, size, None, f"a root of the eliminant at {abs(root):.1e} circle radii: two "
                                     "points of the curve over it meet the hypersurface at once"))
            continue
        point = np.array([polyval(root, sums[:bound + 1, j]) for j in range(fibre.n)]) / weight
        held_ratio = np.abs(fibre.held(point)[0]) / np.maximum(fibre.held_sizes(point), 1e-300)
        if not np.all(np.isfinite(point)) or float(np.max(held_ratio)) > _ON_CURVE:
            readings.append(_Reading(t, size, None, f"a root of the eliminant at {abs(root):.1e} circle radii gave no "
                                     f"point of the curve (residual {float(np.max(held_ratio)):.1e} of its terms)"))
            continue
        readings.append(_Reading(t, size, point))
    return readings, False


def _distinct(points, scale, tolerance=1e-8):
    kept = []
    for p in points:
        if all(np.linalg.norm(p - q) > tolerance * (scale + np.linalg.norm(q)) for q in kept):
            kept.append(p)
    return kept


def _taylor(coefficients, centre):
    """The coefficients of P(centre + u) in u (P given by its coefficients, lowest first)."""
    degree = len(coefficients) - 1
    shifted = np.zeros(degree + 1, dtype=complex)
    for j in range(degree + 1):
        k = np.arange(j, degree + 1)
        binomials = np.array([math.comb(int(i), j) for i in k], dtype=float)
        shifted[j] = np.sum(coefficients[k] * binomials * centre ** (k - j))
    return shifted


def _located(coefficients, members, floor):
    """A cluster of m roots as one root of multiplicity m: (centre, how far the sampling's error spreads such a
    root), the centre the simple root of P^(m-1) next to the cluster's mean (where the mean of a split multiple
    root is as accurate as a simple root, P^(m-1) is regular)."""
    m = len(members)
    centre = complex(np.mean(members))
    derivative = np.polynomial.polynomial.polyder(coefficients, m - 1) if m > 1 else coefficients
    slope = np.polynomial.polynomial.polyder(derivative)
    for _ in range(8):
        denominator = np.polynomial.polynomial.polyval(centre, slope)
        if denominator == 0:
            break
        centre = centre - np.polynomial.polynomial.polyval(centre, derivative) / denominator
    leading = abs(_taylor(coefficients, centre)[m])
    # the error of R's values near the centre, and the m-th root it moves an m-fold root by
    error = floor * float(np.sum(np.maximum(abs(centre), 1.0) ** np.arange(len(coefficients))))
    spread = (error / leading) ** (1.0 / m) if leading > 0 else np.inf
    return centre, spread


def _clusters(coefficients, roots, floor):
    """The roots of P grouped into multiple roots: the nearest groups are merged while the merged group lies within
    the spread the sampling's error gives a root of its multiplicity. Yields (centre, size, located): located
    False where the centre is not known to :data:`_LOCATED` of its size."""
    groups = [[complex(r)] for r in roots]
    while len(groups) > 1:
        means = np.array([np.mean(g) for g in groups])
        distance = np.abs(means[:, None] - means[None, :]) + np.diag(np.full(len(groups), np.inf))
        i, j = np.unravel_index(int(np.argmin(distance)), distance.shape)
        merged = groups[i] + groups[j]
        centre, spread = _located(coefficients, merged, floor)
        if np.max(np.abs(np.array(merged) - centre)) > _SPREAD_FACTOR * spread:
            break
        groups = [g for k, g in enumerate(groups) if k not in (i, j)] + [merged]
    for members in groups:
        centre, spread = _located(coefficients, members, floor)
        # the centre (a simple root of P^(m-1)) is known to about the error over P^(m)'s size: spread^m
        located = bool(np.isfinite(spread) and spread ** len(members) <= _LOCATED * max(abs(centre), 1.0))
        yield centre, len(members), located
