"""Local witness sets and local monodromy: the multiplicity of X at a point and the branches of a curve.

A generic affine slice L(c) = {A (x - p) = c b} of complementary dimension passes near the point p for
small c. Of the points of X on L(c), those that converge to p as c -> 0 form the local witness set; their
number is the multiplicity of X at p (the degree of the tangent cone). They are told apart from the
others by moving c from eps1 to eps2 = eps1 / 10: on a slice transversal to the tangent cone a local
point lies about |c| / |a . t| from p (t the tangent of its branch) and moves towards p by the factor
1/10, the others hardly move.

For curves, c = eps1 exp(i theta) goes once around the circle: the local points are permuted, and the
orbits are the local branches (numerical local irreducible decomposition: Brake, Hauenstein and
Sommese 2016), each orbit's size the branch's multiplicity. A branch's tangent is the direction of the
centroid of its orbit seen from p (the terms of its Puiseux series that are not powers of the
orbit's size cancel in the centroid). With a real slice at a real point, a branch is real when its
orbit is closed under complex conjugation.

Loops use the straight-line parameter path (gamma = 1): the slice's constant then runs along chords of
the circle, which stay away from c = 0, the only place near p where local points meet. A slice for which
the picture is not yet asymptotic (a branch that does not shrink at the rate of its multiplicity, a
point that neither converges nor stays, a lost path, a slice nearly tangent to a branch) is replaced
by another random one.
"""

import dataclasses
from dataclasses import dataclass, field, replace

import numpy as np
import scipy.linalg
import scipy.optimize

from ..system.display import counted
from ..system.polynomial import PolynomialSystem
from ..tracking.homotopy import ParameterHomotopy, random_unit_complex
from ..tracking.service import track
from ..tracking.tracker import TrackerOptions
from .cascade import combine_equations, linear_form
from ..numeric.seeds import random_state
from .decompose import _polynomial_part, centred_decomposition, holding_equations

__all__ = ["LocalOptions", "LocalPicture", "local_picture", "hypersurface_witness", "orbit_tangent", "order_radius",
           "LocalSetting", "local_setting", "component_multiplicity"]

#: A local point moves towards p by about eps2/eps1 (0.1), the others by a factor near 1. A ratio
#: between these two means a slice too close to special: another slice is drawn.
_CONVERGING_RATIO = 0.6
_STAYING_RATIO = 0.9
#: |a . t| of the slice's unit normal and a branch's unit tangent below this: a nearly tangent slice
#: (its far intersections come close to the point); another slice is drawn.
_TRANSVERSAL = 0.25
#: What is unknown about the equation (rounding, the point's distance to the singular point) may move a local
#: point by at most this fraction of its distances to the point and to the slice's other points: else the
#: picture may be that of another curve, and a wider slice is tried (decision 0056). The reading tolerates
#: far more (shrink within a factor 1.5, matching within a quarter of a separation).
_RESOLVED = 1e-2


@dataclass
class LocalOptions:
    """Radii and steps of the local slices.

    Attributes
    ----------
    radius : float
        eps1 relative to 1 + |p| (in balanced units).
    shrink : float
        eps2 / eps1.
    loop_steps : int
        Chords of the monodromy loop.
    attempts : int
        Random slices tried at each radius until one gives a clear picture.
    widen : tuple of float
        Radii tried in turn, as multiples of ``radius``, when the local points lie where the equation's
        terms are not above what is unknown about them (only with a measure of that, ``unresolved``).
    ceiling : float
        No radius beyond this: where the equation's higher terms overtake its lowest one (see
        :func:`order_radius`), farther points are not local yet.
    branches : bool
        For curves, also the branches (monodromy orbits); False: the count only (the check's local
        multiplicity, decision 0105).
    tracker : TrackerOptions
        Tight corrector: local points of tangent branches are close together; ill-conditioned endpoints
        (two local points of a cusp 1e-8 apart) are kept as regular ones, the shrink and loop checks
        judge them. The endgame starts at 1 - 1e-9 only: the end slice lies eps from the place where local
        points meet, and an endgame circle of the usual size around it would wind around that place and
        report the local points as one multiple endpoint.
    """

    radius: float = 1e-3
    shrink: float = 1e-1
    loop_steps: int = 24
    attempts: int = 6
    widen: tuple = (1.0, 3.0, 10.0, 30.0)
    ceiling: float = np.inf
    branches: bool = True
    tracker: TrackerOptions = field(default_factory=lambda: TrackerOptions(corrector_tolerance=1e-9, rescue_digits=0,
                                                                           singular_condition=1e13,
                                                                           endgame_radius=1e-9))


@dataclass
class LocalPicture:
    """The local witness set at a point and, for curves, its monodromy orbits.

    Attributes
    ----------
    multiplicity : int or None
    local_points : ndarray, shape (m, n)
        The local witness points on L(eps1) (computed units).
    near_points : ndarray, shape (m, n)
        The same points on L(eps2).
    orbits : list of list of int or None
        Indices into ``local_points``, one list per branch (curves only).
    real_orbits : list of bool or None
        Orbits closed under conjugation (real slice at a real point only).
    lost : int
        Paths that failed or went to infinity.
    notes : list of str
    shrink : float
        eps2 / eps1.
    """

    multiplicity: object
    local_points: np.ndarray
    near_points: np.ndarray
    orbits: object = None
    real_orbits: object = None
    lost: int = 0
    notes: list = field(default_factory=list)
    shrink: float = 0.1


def _slice_rows(directions, point, constants):
    """Rows R with R (1, x) = 0 exactly on {directions (x - point) = constants}."""
    rows = np.empty((len(directions), len(point) + 1), dtype=complex)
    rows[:, 1:] = directions
    rows[:, 0] = -(directions @ point) - constants
    return rows


def _move(held, points, from_rows, to_rows, rng, tracker, gamma=None):
    """Track points between two slices (NaN rows for lost paths).

    ``gamma`` None draws a random one (the gamma trick); 1 follows the straight parameter path. The
    jump rule compares endpoints at 1e-11: local points of a singular branch are close together
    (eps^(3/2) apart on a cusp) and the loop and shrink checks catch real jumps.
    """
    if len(points) == 0:
        return np.zeros((0, len(from_rows[0]) - 1), dtype=complex)
    start = held + [linear_form(r) for r in from_rows]
    target = held + [linear_form(r) for r in to_rows]
    size = len(start) + 1

    def fresh():
        patch = (rng.standard_normal(size) + 1j * rng.standard_normal(size)) / np.sqrt(2 * size)
        made = ParameterHomotopy(start, target, patch, random_unit_complex(rng) if gamma is None else gamma)
        return made, made.start_solutions_from(points)

    homotopy, starts = fresh()
    run = track(homotopy, starts, tracker, jump_tolerance=1e-11, fresh_homotopy=fresh if gamma is None else None)
    return run.affine_endpoints()


def line_points(polynomial, base, direction):
    """Points of V(f) on the line base + t direction: the roots of f along it (numpy's companion matrix).

    Examples
    --------
    >>> from numag.system.parse import parse_system
    >>> f = parse_system(["x^2 + y^2 - 1"], ["x", "y"]).polynomials[0].numeric()
    >>> np.round(line_points(f, np.zeros(2), np.array([1.0, 0.0])).real, 6).tolist()
    [[-1.0, 0.0], [1.0, 0.0]]
    """
    along = polynomial.substitute_linear(np.asarray(direction, dtype=complex)[:, None], np.asarray(base, dtype=complex))
    coefficients = np.zeros(along.degree + 1, dtype=complex)
    for exponent, value in zip(along.exponents[:, 0], along.numeric_coefficients()):
        coefficients[along.degree - int(exponent)] += value
    roots = np.sort_complex(np.roots(coefficients))
    return base[None, :] + roots[:, None] * np.asarray(direction)[None, :]


def _sliced_directly(polynomial):
    """For a hypersurface: ``family(directions, point, offsets)`` gives ``points(lam)``, the points on the line
    {directions (x - point) = lam offsets} as roots; f along the lines is expanded once, in (lam, t)."""
    def family(directions, point, offsets):
        across = np.linalg.lstsq(directions, offsets, rcond=None)[0]
        along = scipy.linalg.null_space(directions)[:, 0]
        expanded = polynomial.substitute_linear(np.column_stack([across, along]), point)
        exponents, coefficients = expanded.exponents, expanded.numeric_coefficients()
        degree = int(exponents[:, 1].max())

        def points(lam):
            row = np.zeros(degree + 1, dtype=complex)
            np.add.at(row, degree - exponents[:, 1], coefficients * lam ** exponents[:, 0])
            roots = np.roots(row)
            return point[None, :] + lam * across[None, :] + roots[:, None] * along[None, :]
        return points
    return family


def hypersurface_witness(polynomial, rng):
    """Witness points of V(f) on a random line: the roots of f along it, and the line as n - 1 slice rows.

    Examples
    --------
    >>> from numag.system.parse import parse_system
    >>> f = parse_system(["x^2 + y^2 - 1"], ["x", "y"]).polynomials[0].numeric()
    >>> points, rows = hypersurface_witness(f, np.random.default_rng(0))
    >>> points.shape, rows.shape
    ((2, 2), (1, 3))
    """
    n = polynomial.n_variables
    base = rng.standard_normal(n) + 1j * rng.standard_normal(n)
    direction = rng.standard_normal(n) + 1j * rng.standard_normal(n)
    direction /= np.linalg.norm(direction)
    points = line_points(polynomial, base, direction)
    # n - 1 hyperplanes containing the line: rows a with a . direction = 0 (bilinear, not Hermitian)
    complement = scipy.linalg.null_space(direction[None, :]).T
    return points, _slice_rows(complement, base, np.zeros(n - 1, dtype=complex))


def local_picture(polynomials, codimension, point, witness_points, witness_rows, rng, real=False, options=None,
                  unresolved=None):
    """The local witness set of X at ``point`` and, for curves, the branches as monodromy orbits.

    Parameters
    ----------
    polynomials : list of Polynomial
        Affine numeric equations of X (balanced units).
    codimension : int
        Codimension of the components through the point (dimension d = n - codimension of the slice).
    point : ndarray, shape (n,)
    witness_points : ndarray, shape (K, n)
        Points of the d-dimensional components of X on the slice ``witness_rows``.
    witness_rows : ndarray, shape (d, n + 1)
    rng : numpy.random.Generator
    real : bool
        The point and the equations are real: use a real slice, and tell real branches.
    options : LocalOptions, optional
    unresolved : callable, optional
        ``unresolved(points)`` -> what is unknown about the equation at each point relative to the size of its
        terms there (:meth:`numag.anatomy.frame.LocalFrame.unresolved`). A slice whose local points are not
        resolved is no evidence; the radius is widened (``options.widen``) instead.

    Returns
    -------
    LocalPicture

    Examples
    --------
    >>> from numag.system.parse import parse_system
    >>> f = parse_system(["y^2 - x^2 - x^3"], ["x", "y"]).polynomials[0].numeric()
    >>> rng = np.random.default_rng(1)
    >>> points, rows = hypersurface_witness(f, rng)
    >>> picture = local_picture([f], 1, np.zeros(2), points, rows, rng, real=True)
    >>> picture.multiplicity, len(picture.orbits), picture.real_orbits
    (2, 2, [True, True])
    """
    options = options or LocalOptions()
    point = np.asarray(point, dtype=complex)
    equations, _ = holding_equations_for(polynomials, codimension, witness_points, rng)
    held = combine_equations([p.homogenize(0) for p in equations], codimension, rng)
    # a hypersurface's slices are lines: their points are roots, found without tracking (tracking the local
    # points of a cusp inwards loses them once they are about 1e-5 apart)
    direct = _sliced_directly(polynomials[0]) if len(polynomials) == 1 and codimension == 1 else None
    tried = []
    widen = options.widen if unresolved is not None else options.widen[:1]
    radii = [options.radius * factor for factor in widen if options.radius * factor < options.ceiling]
    if len(radii) < len(widen):  # the widening stops at the ceiling, and tries the ceiling itself
        radii.append(options.ceiling)
    counted_only = None  # the first picture whose count is resolved and its branches not
    for radius in radii:
        at_radius = dataclasses.replace(options, radius=radius)
        unresolved_here = 0
        for _ in range(options.attempts):
            picture, problem = _attempt(held, codimension, point, witness_points, witness_rows, rng, real,
                                        at_radius, direct, unresolved)
            if not problem:
                return picture
            tried.append(problem)
            if problem == _BRANCHES_UNRESOLVED and counted_only is None:
                counted_only = picture
            unresolved_here += problem in (_UNRESOLVED, _BRANCHES_UNRESOLVED)
            if unresolved_here == _UNRESOLVED_TRIES:  # a property of the radius more than of the slice: widen
                break
    if counted_only is not None:
        counted_only.orbits, counted_only.real_orbits = None, None
        counted_only.notes.append(f"the local points are counted, but no slice resolved them against each other "
                                  f"({'; '.join(_summarised(tried))}): the branches are not told")
        return counted_only
    # an unclear picture is not a count: the last slice's number of converging points is no evidence (a far
    # point that came close counts as local), so the multiplicity and the branches stay undecided
    picture.multiplicity, picture.orbits, picture.real_orbits = None, None, None
    picture.notes.append(f"no clear local picture after {counted(len(tried), 'random slice')} "
                         f"({'; '.join(_summarised(tried))}): the multiplicity and the branches are not counted")
    return picture


#: Slices whose local points are not resolved before the radius is widened (it depends a little on the slice).
_UNRESOLVED_TRIES = 2
#: The problem of a slice whose local points are resolved against their distance to the point (the count
#: stands) but not against each other (the branches do not).
_BRANCHES_UNRESOLVED = "the local points were not resolved against each other"
#: The problem of a slice whose local points lie where the equation is not known well enough.
_UNRESOLVED = "the equation's terms at the local points were not above what is unknown about them"


def _resolved(unresolved, points, local, point, apart=True):
    """What is unknown about the equation moves each local point by at most ``_RESOLVED`` times its distance
    to the point and, with ``apart``, to the nearest other point of the slice (what the branches are read
    from)."""
    apart = np.linalg.norm(points[local] - point, axis=1) if not apart else None
    if apart is None:
        gaps = np.linalg.norm(points[local][:, None, :] - points[None, :, :], axis=2)
        gaps[np.arange(len(local)), local] = np.inf
        apart = np.minimum(gaps.min(axis=1), np.linalg.norm(points[local] - point, axis=1))
    return bool(np.all(unresolved(points[local] - point, apart) <= _RESOLVED))


def _summarised(problems):
    """Distinct problems with their counts, in the order first met."""
    counts = {}
    for problem in problems:
        counts[problem] = counts.get(problem, 0) + 1
    return [problem if count == 1 else f"{problem} (x{count})" for problem, count in counts.items()]


def _attempt(held, codimension, point, witness_points, witness_rows, rng, real, options, direct=None,
             unresolved=None):
    """One random slice: the picture, and what makes it unclear ("" when it is clear)."""
    n = len(point)
    d = n - codimension
    if real:
        directions = rng.standard_normal((d, n)).astype(complex)
        offsets = rng.standard_normal(d).astype(complex)
    else:
        directions = rng.standard_normal((d, n)) + 1j * rng.standard_normal((d, n))
        offsets = rng.standard_normal(d) + 1j * rng.standard_normal(d)
    directions /= np.linalg.norm(directions, axis=1, keepdims=True)
    offsets /= np.linalg.norm(offsets)
    eps1 = options.radius * (1 + float(np.linalg.norm(point)))
    eps2 = eps1 * options.shrink
    rows1 = _slice_rows(directions, point, eps1 * offsets)
    rows2 = _slice_rows(directions, point, eps2 * offsets)
    if direct is not None:
        direct = direct(directions, point, offsets)
        on1 = direct(eps1)
        found = direct(eps2)
        # pair the points of L(eps1) and L(eps2) at least total distance: in the asymptotic regime a far point
        # moves by O(eps), a local one from eps1 t / (a . t) to eps2 t / (a . t) along its tangent t; the
        # shrink check below tests the pairing
        rows, cols = scipy.optimize.linear_sum_assignment(
            np.linalg.norm(on1[:, None, :] - found[None, :, :], axis=2))
        on2 = found[cols[np.argsort(rows)]]
        lost = 0 if len(found) == len(on1) else abs(len(found) - len(on1))
    else:
        on1 = _move(held, witness_points, witness_rows, rows1, rng, options.tracker)
        lost = int(np.sum(~np.all(np.isfinite(on1), axis=1)))
        on1 = on1[np.all(np.isfinite(on1), axis=1)]
        # eps1 -> eps2 along the ray (gamma = 1): a gamma-trick arc can pass close to c = 0, where the local
        # points meet; a discriminant point on the ray means a slice not yet asymptotic, and another is drawn
        on2 = _move(held, on1, rows1, rows2, rng, options.tracker, gamma=1.0)
        lost += int(np.sum(~np.all(np.isfinite(on2), axis=1)))
    with np.errstate(invalid="ignore"):
        ratio = np.linalg.norm(on2 - point, axis=1) / np.linalg.norm(on1 - point, axis=1)
    local = np.nonzero(np.isfinite(ratio) & (ratio < _CONVERGING_RATIO))[0]
    picture = LocalPicture(len(local), on1[local], on2[local], lost=lost, shrink=options.shrink)
    if lost:
        return picture, f"{counted(lost, 'path')} failed or went to infinity"
    # the picture is that of the equation as computed; it is f's only where what is unknown about the terms
    # (rounding, a point off the singular point) is small beside them, at the local points of both slices
    if unresolved is not None and len(local) and not (_resolved(unresolved, on1, local, point, False) and
                                                      _resolved(unresolved, on2, local, point, False)):
        return picture, _UNRESOLVED
    unclear = np.isfinite(ratio) & (ratio >= _CONVERGING_RATIO) & (ratio < _STAYING_RATIO)
    if np.any(unclear):
        return picture, "a point neither converged nor stayed"
    # on a slice transversal to the tangent cone every local point is about eps / |a . t| from the point:
    # it shrinks with eps; otherwise the slice is not yet in the asymptotic regime (nearly tangent to a
    # branch, or far points close by)
    if np.any(np.abs(np.log(ratio[local] / options.shrink)) > np.log(1.5)):
        return picture, "a local point did not shrink with the slice"
    if not options.branches:
        return picture, ""
    if d == 1 and not len(local):
        picture.orbits, picture.real_orbits = [], ([] if real else None)
    if d == 1 and len(local) and unresolved is not None and not (_resolved(unresolved, on1, local, point) and
                                                                 _resolved(unresolved, on2, local, point)):
        # the count stands (each local point is resolved against its distance to p), the branches do not (a
        # point may move by more than its distance to the nearest other one, as A6's pair 2 eps^3.5 apart)
        return picture, _BRANCHES_UNRESOLVED
    if d == 1 and len(local):
        problem = _orbits(picture, held, directions, point, eps1 * offsets, rng, options, real, direct, eps1)
        if problem:
            return picture, problem
        for orbit in picture.orbits:
            tangent = orbit_tangent(picture, orbit, point)
            if abs(directions[0] @ tangent) < _TRANSVERSAL:
                return picture, "the slice was nearly tangent to a branch"
    return picture, ""


def order_radius(polynomial):
    """The radius within which the lowest homogeneous form of g (at u = 0) dominates the higher ones.

    With N_k the sum of the moduli of the degree-k coefficients and m the lowest degree present, the form of
    degree k overtakes the lowest one near |u| = (N_m / N_k)^(1 / (k - m)); the smallest of these. A slice
    farther out sees the higher forms' zeros as local ones (a frame whose cubic came out 1e-6 beside a
    quartic of size one counted four local points of E6 at |u| = 1e-2).

    Examples
    --------
    >>> from numag.system.parse import parse_system
    >>> g = parse_system(["1e-6*x^3 + y^4 + x^2*y^2"], ["x", "y"]).polynomials[0].numeric()
    >>> float(order_radius(g))
    5e-07
    """
    degrees = polynomial.exponents.sum(axis=1)
    sizes = np.bincount(degrees, weights=np.abs(polynomial.numeric_coefficients()))
    present = np.nonzero(sizes > 0)[0]
    if len(present) < 2:
        return np.inf
    lowest = present[0]
    return float(min((sizes[lowest] / sizes[k]) ** (1.0 / (k - lowest)) for k in present[1:]))


def holding_equations_for(polynomials, codimension, points, rng):
    """:func:`numag.witness.decompose.holding_equations` for a list of affine polynomials."""
    n = polynomials[0].n_variables
    return holding_equations(PolynomialSystem([f"x{j}" for j in range(n)], list(polynomials)), codimension,
                             points, rng)


def _match(ends, starts):
    """The start each end landed on (-1: none clearly nearest)."""
    result = np.full(len(ends), -1)
    if len(starts) == 1:
        separation = np.inf
    else:
        gaps = np.linalg.norm(starts[:, None, :] - starts[None, :, :], axis=2)
        separation = np.min(gaps[~np.eye(len(starts), dtype=bool)])
    for k, end in enumerate(ends):
        if not np.all(np.isfinite(end)):
            continue
        distance = np.linalg.norm(starts - end[None, :], axis=1)
        best = int(np.argmin(distance))
        if distance[best] < 0.25 * min(separation, np.linalg.norm(starts[best])):
            result[k] = best
    return result


def _orbits(picture, held, directions, point, constant, rng, options, real, direct=None, radius=None):
    """Move the local points once around the circle of constants; the orbits are the branches.

    With ``direct`` (a hypersurface's line slices) the points at each angle are roots and each local point
    is followed by matching its prediction p + (q - p) exp(i dtheta) (a branch's points turn with the
    constant); otherwise they are tracked along chords. Returns what went wrong ("" when the orbits, and
    for a real slice their reality, are set).
    """
    current = picture.local_points
    angles = 2 * np.pi * np.arange(options.loop_steps + 1) / options.loop_steps
    lost = 0
    if direct is not None:
        steps = 16 * options.loop_steps
        turn = np.exp(2j * np.pi / steps)
        for k in range(1, steps + 1):
            found = direct(radius * np.exp(2j * np.pi * k / steps))
            predicted = point + (current - point) * turn
            rows, cols = scipy.optimize.linear_sum_assignment(
                np.linalg.norm(predicted[:, None, :] - found[None, :, :], axis=2))
            current = found[cols[np.argsort(rows)]]
    else:
        for a, b in zip(angles[:-1], angles[1:]):
            current = _move(held, current, _slice_rows(directions, point, constant * np.exp(1j * a)),
                            _slice_rows(directions, point, constant * np.exp(1j * b)), rng, options.tracker,
                            gamma=1.0)
            failed = int(np.sum(~np.all(np.isfinite(current), axis=1)))
            lost += failed
            if failed:
                break
    permutation = _match(current - point, picture.local_points - point)
    if lost or np.any(permutation < 0) or len(set(permutation.tolist())) != len(permutation):
        return "the monodromy loop did not close up into a permutation of the local points"
    seen, orbits = set(), []
    for k in range(len(permutation)):
        if k in seen:
            continue
        orbit, j = [], k
        while j not in seen:
            seen.add(j)
            orbit.append(j)
            j = int(permutation[j])
        orbits.append(orbit)
    picture.orbits = orbits
    if real:
        conjugate = _match(picture.local_points.conj() - point.conj(), picture.local_points - point)
        if np.all(conjugate < 0):
            # the conjugates of this component's local points all lie elsewhere: the component is not its own
            # conjugate (x^2 + y^2 = 0 splits into two conjugate lines), so none of its branches is real
            picture.real_orbits = [False] * len(orbits)
            return ""
        if np.any(conjugate < 0):
            return "complex conjugation did not map the local points onto themselves"
        picture.real_orbits = [set(int(conjugate[j]) for j in orbit) == set(orbit) for orbit in orbits]
    return ""


def orbit_tangent(picture, orbit, point):
    """Unit tangent of a branch, from the centroids of its orbit on L(eps1) and L(eps2).

    The centroid of an orbit, seen from p, is a power series in the slice's constant c (the Puiseux terms
    that are not powers of c cancel): c T + c^2 Q + ...; one Richardson step removes the c^2 term.
    """
    near = np.mean(picture.near_points[orbit], axis=0) - point
    far = np.mean(picture.local_points[orbit], axis=0) - point
    ratio = picture.shrink  # eps2 / eps1: near - ratio^2 far = eps2 (1 - ratio) T + O(eps^3)
    tangent = near - ratio * ratio * far
    tangent = tangent / np.linalg.norm(tangent)
    largest = tangent[int(np.argmax(np.abs(tangent)))]
    return tangent * (abs(largest) / largest)  # the phase that makes the largest coordinate real positive


@dataclass
class LocalSetting:
    """A decomposition written where the local slices at a point are drawn (:func:`local_setting`).

    Attributes
    ----------
    decomposition : Decomposition
        Points and slices in the balanced units of ``scaling`` (centred at the point when that applies).
    polynomials : list of Polynomial
        F in those units (numeric, affine).
    point : ndarray, shape (n,)
        The point in those units (the origin when centred).
    scaling : Scaling or None
        The units (None: the decomposition's own coordinates, unscaled).
    centring : object or None
        The exact centre (:func:`numag.system.centred.centre_near`), when centred.
    """

    decomposition: object
    polynomials: list
    point: np.ndarray
    scaling: object = None
    centring: object = None


def local_setting(decomposition, user_point, scaling=None):
    """The decomposition, F and the point in coordinates centred exactly at the point and balanced anew
    (decision 0091), or in ``scaling``'s units where centring does not apply.

    The local slices' radius is a share of 1 + |point| in balanced units; in the system's own units that is set by
    where the point sits, not by the size of the features around it (two parabolas of size one crossing at (1213,
    2141, 2850) were sliced 4.5 units out, where each looked like one branch of multiplicity 2 through the point).

    Examples
    --------
    >>> from numag.system.parse import parse_system
    >>> from numag.witness.decompose import decompose
    >>> line = decompose(parse_system(["x^2", "x*y"], ["x", "y"]), seed=1)
    >>> local_setting(line, [0, 5]).point.tolist()
    [0j, 0j]
    """
    user_point = np.asarray(user_point, dtype=complex).reshape(-1)
    # a decomposition made fibre by fibre is centred like any other here: only F, the witness points and their
    # slices are used (a component in a fibre is cut generically by its slice, whatever the block's coefficients)
    centred = centred_decomposition(replace(decomposition, fibred_over=None), user_point)
    if centred is not None:
        decomposition, centring = centred
        scaling = decomposition.scaling
        point = scaling.to_computed((user_point - centring.point)[None, :])[0]
    else:
        centring = None
        point = user_point if scaling is None else scaling.to_computed(user_point[None, :])[0]
    system = _polynomial_part(decomposition.system)
    if scaling is not None:
        system = scaling.scale_system(system)
        decomposition = decomposition.in_units(scaling, system, to_user=False)
    return LocalSetting(decomposition, [p.numeric() for p in system.polynomials], point, scaling, centring)


def component_multiplicity(decomposition, component, user_point, seed=0, options=None):
    """The multiplicity at a point of one reduced component of X: the number of its points on a generic affine
    slice of complementary dimension near the point that converge to it (the local witness set, decision 0105).

    1 at a smooth point of the component; at least 2 at a singular one (a node, a cusp). Counted in coordinates
    centred at the point (:func:`local_setting`); branches are not told (``options.branches`` is set False).

    Parameters
    ----------
    decomposition : Decomposition
    component : Component
        One of ``decomposition.components`` (generically reduced), through the point.
    user_point : array_like, shape (n,)
        A point of the component, in the decomposition's (user's) units.
    seed : int
    options : LocalOptions, optional

    Returns
    -------
    LocalPicture
        ``multiplicity`` None when no slice gave a clear count (its ``notes`` say why).

    Examples
    --------
    >>> from numag.system.parse import parse_system
    >>> from numag.witness.decompose import decompose
    >>> line = decompose(parse_system(["x^2", "x*y"], ["x", "y"]), seed=1)
    >>> component_multiplicity(line, line.components[0], [0, 0], seed=1).multiplicity
    1
    """
    options = replace(options or LocalOptions(), branches=False)
    _, rng = random_state(seed)
    setting = local_setting(decomposition, user_point, decomposition.scaling)
    index = [id(c) for c in decomposition.components].index(id(component))
    moved = setting.decomposition.components[index]
    return local_picture(setting.polynomials, len(setting.point) - moved.dimension, setting.point, moved.points,
                         moved.slice_rows, rng, options=options)
