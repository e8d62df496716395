"""A family written exactly in x-coordinates centred where its singular members are singular (decision 0082).

The balancing and the term sizes take rho_j = max(|x_j|, 1) (decisions 0002, 0003): features of size 1 at
x = 1234 are cancellations of terms of size 1234^d in the expanded polynomial, which double precision cannot
see (decision 0071). (x - 1234)^3 - 3 (x - 1234) + p lost its discriminant point p = -2 that way, and the
curve family (y + 2345)^2 = (x - 1234)^3 + a (x - 1234) + b its discriminant curve 4 a^3 + 27 b^2 = 0.

A translation of x alone changes nothing a discriminant or a sweep reports in parameter space (the real
counts, the discriminant's points, curve and regions), and a point x of a member maps back by adding the
centre. So the family is located first: the incidence set S = {F = 0, rank J_x F < c} cut by random real
hyperplanes in p only (through a random point of the ranges) is a finite set of singular points (x, p) of members
in the ranges; their x-parts say where the features are. When they sit far from the origin compared with
how far apart they are, the family is written exactly in y = x - s (:func:`numag.system.centred.centred_system`,
parameters kept: their centre is 0) and the work is done there. The translation is exact, so the decision to
centre changes the working coordinates only, never the answer: it is no threshold a result can flip on.

Examples
--------
>>> from numag.system.parse import parse_system
>>> from numag.system.family import Family
>>> family = Family(parse_system(["(x - 1234)^3 - 3*(x - 1234) + p"], ["x", "p"]), ("p",))
>>> found = locate(family, 1, seed=1)
>>> found.centring is not None, [c.to_text() for c in found.centring.centre]
(True, ['1234', '0'])
>>> centred_family(family, found.centring).system.to_texts()
['x^3 - 3*x + p']
"""

from dataclasses import dataclass
import math

import numpy as np

from ..errors import InputError, LimitError
from ..system.centred import centre_near, centred_system, subleading_centre
from ..system.family import Family
from ..system.polynomial import Polynomial, PolynomialSystem
from ..numeric.seeds import random_state
from ..tracking.solve import SolveOptions, solve_system
from ..singular.locus import minors_system

__all__ = ["Located", "locate", "locate_members", "centred_family", "centre_of_points", "FAR_FACTOR",
           "LOCATE_MAX_PATHS"]

#: A family is centred when its located points' centroid is farther from the origin than this many times
#: their spread (their largest distance from it). The translation is exact: this only chooses the working
#: coordinates.
FAR_FACTOR = 10.0
#: The locating solve is skipped (with a note) when its total degree is larger: it is a look, not the work.
LOCATE_MAX_PATHS = 2000


@dataclass(frozen=True)
class Located:
    """Where a family's singular members are singular, and the centring chosen from it.

    Attributes
    ----------
    points : ndarray, shape (K, n)
        x-parts of the located finite singular points (the user's coordinates).
    centring : Centring or None
        Over (x, p) with p's centre 0; None when the points are near the origin (or none was located).
    note : str
        Why nothing was located, or empty.
    """

    points: np.ndarray
    centring: object
    note: str = ""

    @property
    def x_centre(self):
        """The centre's x-part (zeros without a centring)."""
        n = self.points.shape[1]
        return np.zeros(n, dtype=complex) if self.centring is None else self.centring.point[:n]


def centre_of_points(points, m):
    """The exact centring (x-part the points' centroid, p-part 0) when the points are far from the origin.

    Parameters
    ----------
    points : ndarray, shape (K, n)
        Finite points (x-parts).
    m : int
        Number of parameters (their centre is 0: the parameters are kept).

    Returns
    -------
    Centring or None

    Examples
    --------
    >>> centre_of_points(np.array([[1232.3], [1235.7]]), 1).centre[0].to_text()
    '1234'
    >>> centre_of_points(np.array([[-1.7], [1.7]]), 1) is None
    True
    >>> centre_of_points(np.array([[0.1223], [0.1237]]), 1).centre[0].to_text()   # the same in other units
    '123/1000'

    """
    points = np.asarray(points, dtype=complex)
    if len(points) == 0:
        return None
    # real features keep a real centre (a non-real one would make the real members' equations non-real)
    centroid = points.mean(axis=0).real
    distance = float(np.linalg.norm(centroid))
    spread = float(np.max(np.linalg.norm(points - centroid[None, :], axis=1)))
    # scale-free: 0.123 +- 0.001 (millimetres of the same geometry) is as far as 123 +- 1
    if distance == 0 or distance <= FAR_FACTOR * spread:
        return None
    # a grid of a tenth of the spread or finer: short numbers, and the centre within the features' own size. One
    # point (no spread) is rounded at 1e-6 of its distance: a multiple point far out is located to about 1e-7 of
    # it, and a centre at that noise (1233.9999998 for 1234) leaves terms of 1e-12 that the balancing fits as if
    # they were the problem's size (decision 0092)
    size = max(spread, 1e-6 * distance)
    digits = max(1, int(math.ceil(math.log10(1 + distance))) - int(math.floor(math.log10(size))) + 1)
    return centre_near(np.concatenate([centroid, np.zeros(m)]), spread, digits=digits)


def centred_family(family, centring):
    """The family written exactly in y = x - s (the parameters kept), with the same names and ranges."""
    return Family(centred_system(family.system, centring), family.parameters, dict(family.ranges))


def locate(family, codimension, seed=None, max_exact_minors=24):
    """Locate the singular points of members near the parameter ranges, and choose a centring from them.

    S = {F(x, p) = 0, rank J_x F < c} has dimension m - 1 in (x, p) for a family whose discriminant is a
    hypersurface; m - 1 random real hyperplanes in p through a random point of the ranges cut it to points.
    When they are far from the origin, they are located once more in the coordinates centred at them: the first
    look is itself a solve far from the origin, which can miss points and place a multiple one to only 1e-7 of
    its distance (decision 0092).

    Parameters
    ----------
    family : Family
    codimension : int
        Of a generic member.
    seed : int, optional
    max_exact_minors : int

    Returns
    -------
    Located
        No centring (and a note saying why) where the cut system is not square or too large to solve.
    """
    _, rng = random_state(seed)
    n, m = family.n_variables, family.n_parameters
    points, note = _singular_points(family, codimension, rng, max_exact_minors)
    if len(points) == 0 and family.system.n_equations < n:
        # members of positive dimension (a four-bar's curve of configurations): their singular incidence set cut in
        # p is not square; points of one member near its features locate it instead (decision 0101)
        points = _member_points(family, rng)
        note = note if len(points) else note + "; no point of a member was found either"
    centring = centre_of_points(points, m)
    if centring is None:
        return Located(points, None, note)
    # (x - 1234)^4 - 5 (x - 1234)^2 + 4 - p far out: 1 of the 3 points, at 1233.99999976; centred at its rounding
    # 6169999999/5000000 the family had terms of 1e-12, and the discriminant's solve lost every point (decision
    # 0092). Seen from the centre, the points are near the origin: located there, they give the centroid and
    # the spread that round the centre (to 1234).
    try:
        centred = centred_family(family, centring)
    except LimitError:
        return Located(points, centring, note)
    again, _ = _singular_points(centred, codimension, rng, max_exact_minors)
    if len(again) == 0:
        return Located(points, centring, note)
    points = again + centring.point[None, :n]
    return Located(points, centre_of_points(points, m), note)


def _singular_points(family, codimension, rng, max_exact_minors):
    """x-parts of the singular incidence set cut by m - 1 random real hyperplanes in p, and a note if none."""
    n, m = family.n_variables, family.n_parameters
    nothing = np.zeros((0, n), dtype=complex)
    try:
        incidence, _ = minors_system(family.system, codimension, rng, max_exact_minors, n_columns=n)
    except LimitError:
        return nothing, "the minors of J_x are too large to expand"
    # through a random point of the ranges' box, not its middle: a symmetric family's middle is often a cusp
    through = np.array([_random_in_range(family, name, rng) for name in family.parameters])
    cuts = []
    for _ in range(m - 1):
        direction = rng.standard_normal(m)
        # direction . (p - through) = 0, a real hyperplane in p only
        exponents = np.zeros((m + 1, n + m), dtype=np.int64)
        exponents[1:, n:] = np.eye(m, dtype=np.int64)
        coefficients = np.concatenate([[-float(direction @ through)], direction]).astype(complex)
        cuts.append(Polynomial(exponents, coefficients, n + m))
    system = PolynomialSystem(list(incidence.variables), list(incidence.polynomials) + cuts, name="located")
    if system.n_equations != system.n_variables:
        return nothing, (f"the singular incidence set cut in p is {system.n_equations} equations in "
                         f"{system.n_variables} unknowns, not square")
    if math.prod(max(p.degree, 1) for p in system.polynomials) > LOCATE_MAX_PATHS:
        return nothing, f"its locating system has more than {LOCATE_MAX_PATHS} paths"
    try:
        solved = solve_system(system, SolveOptions(second_look=False), seed=int(rng.integers(2 ** 63)))
    except (InputError, LimitError) as err:
        return nothing, f"its locating system was not solved ({err})"
    found = np.array([s.point for s in solved.solutions + list(solved.not_isolated)
                      if not s.at_infinity and np.all(np.isfinite(s.point))], dtype=complex).reshape(-1, n + m)
    # a cut nearly parallel to the discriminant meets it far outside the ranges, where the singular points may be
    # far from those of the members asked about: those are left out when any is left
    low, high = np.array([_range(family, name) for name in family.parameters]).T
    reach = high - low
    inside = np.all((found[:, n:].real >= low - reach) & (found[:, n:].real <= high + reach), axis=1)
    points = found[inside if np.any(inside) else slice(None), :n]
    return points, "" if len(points) else "no finite singular point was found"


def _member_points(family, rng):
    """x-points of one member (a random real parameter value in the ranges) on random complex linear slices through
    the point where its subleading forms vanish (the centre of circles, of symmetric features); none when that
    point is not determined or the sliced member is not solved.

    A complex line through the centre of a circle of radius r meets it within about r of the centre, so the points
    spread as the features do and :func:`centre_of_points` judges them as it judges located singular points.
    """
    n = family.n_variables
    at = [_random_in_range(family, name, rng) for name in family.parameters]
    try:
        member = family.member(at)
    except (InputError, LimitError):
        return np.zeros((0, n), dtype=complex)
    centre = subleading_centre(member)
    dimension = n - member.n_equations
    if centre is None or dimension < 1 or not np.all(np.isfinite(centre)):
        return np.zeros((0, n), dtype=complex)
    slices = []
    for _ in range(dimension):
        weights = rng.standard_normal(n) + 1j * rng.standard_normal(n)
        slices.append(Polynomial.linear(weights, -complex(weights @ centre)))
    sliced = PolynomialSystem(list(member.variables), list(member.polynomials) + slices, name="member on slices")
    if math.prod(max(p.degree, 1) for p in sliced.polynomials) > LOCATE_MAX_PATHS:
        return np.zeros((0, n), dtype=complex)
    try:
        solved = solve_system(sliced, SolveOptions(second_look=False), seed=int(rng.integers(2 ** 63)))
    except (InputError, LimitError):
        return np.zeros((0, n), dtype=complex)
    return np.array([s.point for s in solved.solutions if np.all(np.isfinite(s.point))],
                    dtype=complex).reshape(-1, n)


def locate_members(family, values, seed=None):
    """Locate the solutions of a square family's members near ``values``, and choose a centring from them.

    One member is solved, at a random complex value about the values' middle (of their spread's size), in the
    user's units: a balanced member would be taken where the balancing puts it, which for a family far from the
    origin is far from the values asked about (the constant of (x - 1234)^3 + p is 2e9: p is scaled by 1e10).

    Parameters
    ----------
    family : Family
        As many equations as variables.
    values : ndarray, shape (K, m)
    seed : int, optional

    Returns
    -------
    Located

    Examples
    --------
    >>> from numag.system.parse import parse_system
    >>> family = Family(parse_system(["(x - 1234)^3 - 3*(x - 1234) + p"], ["x", "p"]), ("p",))
    >>> centring = locate_members(family, np.array([[-5.0], [5.0]]), seed=1).centring
    >>> bool(abs(centring.point[0] - 1234) < 1), centring.centre[1].to_text()   # near the solutions; p kept
    (True, '0')
    """
    _, rng = random_state(seed)
    n, m = family.n_variables, family.n_parameters
    values = np.asarray(values, dtype=complex).reshape(-1, m)
    middle = values.mean(axis=0)
    size = 1 + float(np.max(np.abs(values - middle[None, :]))) if len(values) else 1.0
    at = middle + size * (rng.standard_normal(m) + 1j * rng.standard_normal(m)) / 2
    try:
        solved = solve_system(family.member(list(at)), SolveOptions(second_look=False), seed=int(rng.integers(2 ** 63)))
    except (InputError, LimitError) as err:
        return Located(np.zeros((0, n), dtype=complex), None, f"its member was not solved ({err})")
    points = np.array([s.point for s in solved.solutions], dtype=complex).reshape(-1, n)
    note = "" if len(points) else "no finite solution was found"
    centring = centre_of_points(points, m)
    if centring is None:
        return Located(points, None, note)
    # as in :func:`locate`: the far member's solve can merge its roots into one group (the cubic at 1234: one
    # point 2 away from the roots' centroid); seen from that centre they are near the origin and come out apart
    try:
        centred = centred_family(family, centring)
        again = solve_system(centred.member(list(at)), SolveOptions(second_look=False),
                             seed=int(rng.integers(2 ** 63)))
    except (InputError, LimitError):
        return Located(points, centring, note)
    found = np.array([s.point for s in again.solutions], dtype=complex).reshape(-1, n)
    if len(found) < len(points):
        return Located(points, centring, note)
    points = found + centring.point[None, :n]
    return Located(points, centre_of_points(points, m), note)


def _range(family, name):
    """The parameter's range ([-1, 1] without one)."""
    interval = family.ranges.get(name)
    return (-1.0, 1.0) if interval is None else (float(interval.low), float(interval.high))


def _random_in_range(family, name, rng):
    """A random value in the middle half of the parameter's range."""
    low, high = _range(family, name)
    return float(low + (high - low) * rng.uniform(0.25, 0.75))
