"""The local frame of a hypersurface at a singular point: coordinates in which its features have size one.

Every invariant the anatomy reports (multiplicity, corank, mu, tau, Arnold's type, the branches) is
unchanged by an invertible linear change of coordinates x = p + M u. The numbers they are computed from
are not: after a change of condition number kappa, the Taylor coefficients of f at p spread over about
kappa^degree, a fixed local radius lies inside or outside the singularity's own scale, and the Macaulay
matrices of the dual spaces get genuine singular values below rounding (measured: with kappa = 1e3 mu came
out infinite for A3..A6, D4..D6 and E6..E8, decision 0044). So the local work is done in a frame taken
from the point's own geometry:

1. the Hessian's range is whitened: its eigenvectors (real symmetric Hessian at a real point; singular
   vectors otherwise) divided by the square root of their eigenvalue, so the quadratic part is a sum of
   squares of size one;
2. the range is sheared along the kernel so that each range direction's line carries as little of the
   higher-order terms as possible (least squares on the cubic Taylor terms): in the normal form's
   coordinates the range directions are then the quadratic variables and do not pick up the kernel's
   high powers;
3. what remains is a diagonal change of units, chosen by the least-squares balancing of the Taylor
   coefficients (:class:`~numag.numeric.scaling.Scaling`, powers of ten) -- the kernel directions get
   the unit in which their leading terms have size one.

The frame polynomial g(u) = f(p + M u) has its constant and linear terms removed: they are rounding at a
singular point, and removing them makes u = 0 an exact zero of g and its gradient. So are its terms at
rounding level (against the sizes of the terms they were summed from): in the frame's units they would be
magnified into terms the dual space counts.

Examples
--------
>>> from numag.system.parse import parse_system
>>> f = parse_system(["4*x^2 + y^3"], ["x", "y"]).polynomials[0].numeric()
>>> frame = local_frame(f, np.zeros(2), rank=1, real=True)
>>> frame.polynomial.degree, round(frame.condition, 6) >= 1
(3, True)
"""

import itertools
import math
from dataclasses import dataclass

import numpy as np

from ..system.polynomial import Polynomial, PolynomialSystem
from ..numeric.scaling import Scaling

__all__ = ["LocalFrame", "local_frame", "frame_hessian", "kernel_cubic", "cubic_degeneracy", "cubic_root_spread",
           "cube_root_direction"]


@dataclass
class LocalFrame:
    """Coordinates u around a point p with x = p + matrix @ u.

    Attributes
    ----------
    point : ndarray, shape (n,)
    matrix : ndarray, shape (n, n)
        Columns: the ``rank`` whitened range directions first, then the kernel directions.
    polynomial : Polynomial
        f(p + matrix u) without its constant and linear terms (u = 0 is an exact singular point).
    rank : int
        The Hessian rank the frame was built for.
    condition : float
        Condition number of ``matrix`` (how far the frame is from the computed units).
    noise : float
        The largest rounding level of a Taylor coefficient of degree 2 and more in the frame's units, relative
        to the largest coefficient of ``polynomial``: the features below it are out of reach.
    """

    point: np.ndarray
    matrix: np.ndarray
    polynomial: Polynomial
    rank: int
    condition: float
    noise: float
    rounding_degrees: np.ndarray = None
    rounding_levels: np.ndarray = None
    uncertainty: Polynomial = None

    def unresolved(self, points, apart=None):
        """How far what is unknown about g may move its zeros at points u, against how far apart they are
        (vectorised).

        ``uncertainty`` bounds, term by term, what g may differ from f(p + M u) (in the frame's units, relative
        to g's largest coefficient): the rounding of every Taylor coefficient and, for the dropped terms of
        degree 0 and 1, their computed values, which are not rounding when p lies off the singular point. A
        zero of g at u moves by about uncertainty(|u|) / |grad g(u)| under such a change. The ratio is that
        move over ``apart`` (the distance to the nearest other zero, say), or over |u| when ``apart`` is not
        given; no absolute length enters.

        Examples
        --------
        >>> g = Polynomial(np.array([[2, 0], [0, 2]]), np.array([1.0, -1.0]), 2)
        >>> noise = Polynomial(np.array([[0, 0]]), np.array([1e-12]), 2)
        >>> frame = LocalFrame(np.zeros(2), np.eye(2), g, 2, 1.0, 0.0, uncertainty=noise)
        >>> [f"{r:.1e}" for r in frame.unresolved(np.array([[1e-2, 1e-2], [1e-5, 1e-5]]))]
        ['2.5e-09', '2.5e-03']
        """
        points = np.asarray(points, dtype=complex)
        apart = np.linalg.norm(points, axis=1) if apart is None else np.asarray(apart, dtype=float)
        slope = np.sqrt(sum(np.abs(_values(q, points)) ** 2 for q in self.polynomial.gradient()))
        with np.errstate(divide="ignore", invalid="ignore"):
            ratio = _term_total(self.uncertainty, points) / (slope * apart)
        return np.where(np.isnan(ratio), np.inf, ratio)

    def singular_within_uncertainty(self, points):
        """Whether g and its gradient vanish at points u to within what is unknown about g there (vectorised).

        ``uncertainty`` bounds g's terms (rounding, and the dropped terms of degree 0 and 1); at a point where
        |g| and every |dg/du_j| are at most the same bound summed over the uncertainty's terms (and their
        derivatives'), f may as well be singular there as at u = 0: the data cannot tell the two apart.

        Examples
        --------
        >>> g = Polynomial(np.array([[2, 0], [0, 5], [0, 6]]), np.array([1.0, 1e-9, 1.0]), 2)
        >>> noise = Polynomial(np.array([[0, 0], [0, 1]]), np.array([1e-16, 1e-16]), 2)
        >>> frame = LocalFrame(np.zeros(2), np.eye(2), g, 1, 1.0, 0.0, uncertainty=noise)
        >>> frame.singular_within_uncertainty(np.array([[0, -1e-9 / 6], [0, 0.5]])).tolist()
        [True, False]
        """
        points = np.asarray(points, dtype=complex)
        within = np.abs(_values(self.polynomial, points)) <= _term_total(self.uncertainty, points)
        bound = self.uncertainty if self.uncertainty is not None else Polynomial.zero(self.polynomial.n_variables)
        for j, derivative in enumerate(self.polynomial.gradient()):
            within &= np.abs(_values(derivative, points)) <= _term_total(bound.derivative(j), points)
        return within

    def noise_up_to(self, degree):
        """The largest rounding level (relative, frame units) of a Taylor coefficient of degree <= ``degree``.

        Examples
        --------
        >>> frame = LocalFrame(np.zeros(1), np.eye(1), None, 0, 1.0, 0.5, np.array([2, 5]), np.array([1e-9, 0.5]))
        >>> frame.noise_up_to(3), frame.noise_up_to(5)
        (1e-09, 0.5)
        """
        chosen = self.rounding_levels[self.rounding_degrees <= degree]
        return float(np.max(chosen, initial=0.0))

    def to_ambient(self, direction):
        """A direction in u -> the unit direction in x."""
        vector = self.matrix @ np.asarray(direction, dtype=complex)
        return vector / np.linalg.norm(vector)


def frame_hessian(polynomial, point):
    """The Hessian of f at a point (computed units), symmetrised."""
    n = polynomial.n_variables
    hessian = np.zeros((n, n), dtype=complex)
    point = np.asarray(point, dtype=complex)
    for i, g in enumerate(polynomial.gradient()):
        for j in range(n):
            second = g.derivative(j)
            if not second.is_zero():
                hessian[i, j] = complex(second.numeric().evaluate(point))
    return (hessian + hessian.T) / 2


#: A Taylor coefficient of g at most this times the same coefficient of |f|(|p| + |M| u) (the sizes of the
#: terms it was summed from) is rounding: it is dropped (about 450 units of rounding; kept, such terms
#: were measured at 1e-10 beside a genuine v^4 of 6e-5 and read by the dual space as genuine).
_ROUNDING = 1e-13


def _moved(f, matrix, point, level=_ROUNDING):
    """f(p + M u) without its terms of degree 0 and 1 and without terms at rounding level; and the rounding
    level of every term of degree 2 and more (a polynomial with the same exponents as |f|(|p| + |M| u))."""
    moved = f.substitute_linear(matrix, point)
    sizes = f.absolute().substitute_linear(np.abs(matrix), np.abs(point))
    size_of = {tuple(e): abs(c) for e, c in zip(sizes.exponents.tolist(), sizes.numeric_coefficients())}
    coefficients = moved.numeric_coefficients()
    keep = np.array([sum(e) >= 2 and abs(c) > level * size_of.get(tuple(e), 0.0)
                     for e, c in zip(moved.exponents.tolist(), coefficients)], dtype=bool)
    high = sizes.exponents.sum(axis=1) >= 2
    rounding = Polynomial(sizes.exponents[high], _ROUNDING * np.abs(sizes.numeric_coefficients()[high]),
                          f.n_variables)
    if not np.any(keep):
        return Polynomial.zero(f.n_variables), rounding
    return Polynomial(moved.exponents[keep], coefficients[keep], f.n_variables), rounding


def _values(polynomial, points):
    """A polynomial's values at each row of ``points`` (vectorised)."""
    polynomial = polynomial.numeric()
    if polynomial.n_terms == 0:
        return np.zeros(len(points), dtype=complex)
    return np.prod(points[:, None, :] ** polynomial.exponents[None, :, :], axis=2) @ polynomial.numeric_coefficients()


def _term_total(polynomial, points):
    """The sum of the moduli of a polynomial's terms at each point (rows of ``points``), vectorised."""
    if polynomial is None or polynomial.n_terms == 0:
        return np.zeros(len(points))
    powers = np.prod(np.abs(np.asarray(points))[:, None, :] ** polynomial.exponents[None, :, :], axis=2)
    return powers @ np.abs(polynomial.numeric_coefficients())


#: The rounding of a Taylor coefficient against its term size, as the local picture weighs it: a few units of
#: rounding (the frame's dropping rule, ``_ROUNDING``, is deliberately wider: there a kept rounding term is
#: read as genuine, here a term's size only limits how small a slice can be).
_PICTURE_ROUNDING = 1e-15


def _uncertainty(f, matrix, point, kept):
    """Term by term, how much the frame polynomial ``kept`` may differ from f(p + M u): the rounding level of
    each Taylor coefficient, and at least what the frame dropped of it (the terms of degree 0 and 1, which
    are not rounding when p lies off the singular point, and the terms taken for rounding). Absolute values.
    """
    moved = f.substitute_linear(matrix, point)
    sizes = f.absolute().substitute_linear(np.abs(matrix), np.abs(point))
    value_of = {tuple(e): c for e, c in zip(moved.exponents.tolist(), moved.numeric_coefficients())}
    for e, c in zip(kept.exponents.tolist(), kept.numeric_coefficients()):
        value_of[tuple(e)] = value_of.get(tuple(e), 0.0) - c
    levels = _PICTURE_ROUNDING * np.abs(sizes.numeric_coefficients())
    dropped = np.abs([value_of.get(tuple(e), 0.0) for e in sizes.exponents.tolist()])
    return Polynomial(sizes.exponents, np.maximum(levels, dropped).astype(complex), f.n_variables)


def _ordered_directions(hessian, real):
    """Eigen- or singular directions of the Hessian, largest first, and their sizes."""
    if real:
        values, vectors = np.linalg.eigh(hessian.real)
        order = np.argsort(-np.abs(values))
        return np.abs(values[order]), vectors[:, order].astype(complex)
    _, values, right = np.linalg.svd(hessian)
    return values, right.conj().T


def _coefficients(polynomial, count):
    """{exponent tuple: coefficient} of a polynomial in its first ``count`` variables."""
    table = {}
    for exponent, value in zip(polynomial.exponents, polynomial.numeric_coefficients()):
        key = tuple(int(e) for e in exponent[:count])
        table[key] = table.get(key, 0) + value
    return table


#: Shear columns below this (against g's largest coefficient) are rounding; shears are capped at this size.
_SHEAR_FLOOR = 1e-8
_SHEAR_LIMIT = 1e2


def _shear(polynomial, movers, plane):
    """Components along ``plane`` (len(plane) x len(movers)) that make the ``movers`` directions conjugate to
    the plane spanned by the ``plane`` coordinates.

    In a normal form's coordinates f = Q(range) + h(kernel): the derivative along a range direction
    vanishes on the whole kernel plane. Along e_i + K c_i the derivative restricted to the plane is
    d_i g(0, v) + sum_k c_ik d_k g(0, v), linear in c_i: its coefficients (as a polynomial in v) are set to
    zero in the least-squares sense.
    """
    n = polynomial.n_variables
    shear = np.zeros((len(plane), len(movers)), dtype=complex)
    if not plane or not movers:
        return shear
    onto_plane = np.zeros((n, len(plane)))
    onto_plane[list(plane), np.arange(len(plane))] = 1.0
    tables = {j: _coefficients(polynomial.derivative(j).numeric().substitute_linear(onto_plane), len(plane))
              for j in list(movers) + list(plane)}
    monomials = sorted(set().union(*tables.values()))
    if not monomials:
        return shear
    columns = np.array([[tables[k].get(m, 0) for k in plane] for m in monomials], dtype=complex)
    # a plane on which g vanishes (the root line of E7's cubic) has rounding for columns: no shear from it
    if not np.linalg.norm(columns) > _SHEAR_FLOOR * float(np.max(np.abs(polynomial.numeric_coefficients()))):
        return shear
    for a, i in enumerate(movers):
        target = -np.array([tables[i].get(m, 0) for m in monomials], dtype=complex)
        shear[:, a] = np.linalg.lstsq(columns, target, rcond=1e-8)[0]
    # a shear is a correction of a frame already within a few decades of the right one
    size = np.linalg.norm(shear)
    return shear if size <= _SHEAR_LIMIT else shear * (_SHEAR_LIMIT / size)


def kernel_cubic(polynomial, point, kernel):
    """The cubic term of f at the point along the kernel: coefficients of u^3, u^2 v, u v^2, v^3.

    Returns
    -------
    cubic : ndarray, shape (4,)
    size : float
        The largest coefficient of f restricted to the kernel plane (the cubic's yardstick).
    """
    restricted = polynomial.numeric().substitute_linear(kernel, point)
    cubic = np.zeros(4, dtype=complex)
    for exponent, value in zip(restricted.exponents, restricted.numeric_coefficients()):
        if exponent[0] + exponent[1] == 3:
            cubic[int(exponent[1])] += value
    size = float(np.max(np.abs(restricted.numeric_coefficients()), initial=0.0))
    return cubic, size


def cubic_degeneracy(cubic):
    """|Hessian covariant| / |cubic|^2 of a binary cubic: 0 exactly when it is the cube of a linear form.

    Examples
    --------
    >>> round(cubic_degeneracy(np.array([1, 0, 0, 0])), 12)    # u^3
    0.0
    >>> cubic_degeneracy(np.array([0, 1, 0, 0])) > 0.1        # u^2 v (a double root)
    True
    """
    a, b, c, d = cubic
    covariant = np.array([3 * a * c - b * b, 9 * a * d - b * c, 3 * b * d - c * c])
    return float(np.linalg.norm(covariant) / np.linalg.norm(cubic) ** 2)


#: Root directions of the kernel cubic (unit vectors) with |det| below this are not used as a basis: the
#: cubic is treated as a cube, its root as the first axis and the orthogonal complement, sheared, as the second.
_APART = 0.05


def cubic_root_spread(cubic):
    """The smallest |det| between two unit root directions of a binary cubic (0 for a multiple root).

    Examples
    --------
    >>> round(float(cubic_root_spread(np.array([0, 1, 0, -1]))), 6)   # u^2 v - v^3 = v (u - v)(u + v)
    0.707107
    """
    directions = _cubic_roots(cubic)
    if directions is None:
        return 0.0
    return min(float(abs(np.linalg.det(np.column_stack([directions[i], directions[j]]))))
               for i, j in ((0, 1), (0, 2), (1, 2)))


def _cubic_roots(cubic):
    """The three root directions (unit vectors) of a binary cubic sum cubic[k] u^(3-k) v^k, or None."""
    return _form_roots(cubic)


def _form_roots(form):
    """The root directions (unit vectors) of a binary form sum form[k] u^(d-k) v^k of degree d, or None.

    The form is turned by half a radian first, so that no root lies at v = 0 (infinity of z = u / v).

    Examples
    --------
    >>> roots = _form_roots(np.array([1, 0, 0, 0, -1]))    # u^4 - v^4: u = v, -v, i v, -i v
    >>> [round(float(abs(r[0] / r[1])), 6) for r in roots]
    [1.0, 1.0, 1.0, 1.0]
    """
    degree = len(form) - 1
    turn = np.array([[np.cos(0.5), -np.sin(0.5)], [np.sin(0.5), np.cos(0.5)]])
    turned = np.zeros(degree + 1, dtype=complex)
    u, v = np.array([turn[0, 0], turn[0, 1]]), np.array([turn[1, 0], turn[1, 1]])  # in z = s / t
    for k, value in enumerate(form):  # value * u^(d-k) v^k with (u, v) = turn (z, 1)
        term = np.array([value], dtype=complex)
        for _ in range(degree - k):
            term = np.polymul(term, u)
        for _ in range(k):
            term = np.polymul(term, v)
        turned += np.pad(term, (degree + 1 - len(term), 0))
    if not np.linalg.norm(turned) > 0:
        return None
    roots = np.roots(turned)
    if len(roots) != degree:
        return None
    directions = [turn @ np.array([z, 1.0]) for z in roots]
    return [d / np.linalg.norm(d) for d in directions]


def kernel_form(polynomial, rank, degree):
    """The form of a given degree of g restricted to its last two coordinates (a corank-2 kernel plane):
    coefficients of u^degree, u^(degree-1) v, ..., v^degree."""
    form = np.zeros(degree + 1, dtype=complex)
    for exponent, value in zip(polynomial.exponents, polynomial.numeric_coefficients()):
        if not np.any(exponent[:rank]) and exponent[rank] + exponent[rank + 1] == degree:
            form[int(exponent[rank + 1])] += value
    return form


def _spread(directions):
    """The smallest |det| of two unit directions (0 for a repeated one)."""
    return min((float(abs(np.linalg.det(np.column_stack([a, b])))) for k, a in enumerate(directions)
                for b in directions[k + 1:]), default=1.0)


def _form_basis(form, real):
    """A basis of the kernel plane (2 x 2, columns) in which the roots of a binary form of degree >= 4 lie
    far apart, and whether its roots are (nearly) one repeated root.

    A linear change of condition kappa crowds the roots of the kernel's leading form into an arc of size
    1/kappa (x^4 + y^4 at kappa = 1e3: the dual space then counted an infinite mu); a linear change of the
    plane moves them freely (a Moebius map of the projective line): three roots are sent to 0, infinity
    and 1, or, for a real frame, one non-real root to i (real maps fix the upper half plane's geometry);
    of these candidates the one whose roots end furthest apart is kept. A form with one repeated root
    (x^4 + y^5 + x^2 y^3) gives that root as the first axis, the complement is chosen by the shear.
    """
    directions = _form_roots(form)
    if directions is None:
        return None, False
    if _spread(directions) > 0.1:   # already well apart: keep the plane as it is
        return None, False
    if max(float(abs(np.linalg.det(np.column_stack([directions[0], d])))) for d in directions) < _APART:
        # a (near) power of a linear form l^d: the (d-1)-th derivatives are multiples of l, their common
        # null vector is the root (it moves by the perturbation, where the roots split by its d-th root)
        degree = len(form) - 1
        rows = []
        for a in range(degree):  # d^(d-1) / du^(d-1-a) dv^a of the form, a linear form in (u, v)
            row = np.zeros(2, dtype=complex)
            for k in (a, a + 1):
                value = form[k] * math.factorial(degree - k) * math.factorial(k)
                row[k - a] = value
            rows.append(row)
        first = np.linalg.svd(np.array(rows))[2][-1].conj()
        if real and np.linalg.norm(first.real) > 0.5:
            first = first.real
        first = first / np.linalg.norm(first)
        return np.column_stack([first, [-np.conj(first[1]), np.conj(first[0])]]).astype(complex), True
    candidates = []
    if real:
        for d in directions:
            basis = np.column_stack([d.imag, d.real])  # maps (i, 1) to d: a non-real root to i
            if abs(np.linalg.det(basis)) > 1e-12:
                candidates.append(basis.astype(complex))
        real_roots = [d * np.exp(-1j * np.angle(d[np.argmax(np.abs(d))])) for d in directions]
        real_roots = [d.real for d in real_roots if np.linalg.norm(d.imag) < 1e-8]
    else:
        real_roots = directions
    for first, second, third in itertools.permutations(range(len(real_roots)), 3):
        pair = np.column_stack([real_roots[first], real_roots[second]])
        if abs(np.linalg.det(pair)) > 1e-12:  # e1 -> first root, e2 -> second, (1, 1) -> third
            weights = np.linalg.solve(pair, real_roots[third])
            candidates.append((pair * weights[None, :]).astype(complex))
    best, best_spread = None, _spread(directions)
    for basis in candidates:
        basis = basis / np.linalg.norm(basis, axis=0)[None, :]
        mapped = [np.linalg.solve(basis, d) for d in directions]
        spread = _spread([m / np.linalg.norm(m) for m in mapped])
        if spread > best_spread:
            best, best_spread = basis, spread
    return best, False


def cube_root_direction(cubic):
    """The root direction (unit vector) of a binary cubic that is (nearly) a cube l^3.

    A perturbed cube's roots split by eps^(1/3); the kernel of its Hessian (6 l grad l grad l^T for l^3)
    moves by eps only: the stacked Hessians at (1, 0) and (0, 1) have the root as null vector.

    Examples
    --------
    >>> np.round(np.abs(cube_root_direction(np.array([0, 0, 0, 1.0]))), 6)   # v^3: the root is v = 0
    array([1., 0.])
    """
    a, b, c, d = cubic
    stacked = np.array([[3 * a, b], [b, c], [b, c], [c, 3 * d]], dtype=complex)
    return np.linalg.svd(stacked)[2][-1].conj()


def _kernel_basis(polynomial, rank, real):
    """A basis of a corank-2 kernel plane from the roots of the cubic on it (2 x 2, columns in kernel
    coordinates), and whether the cubic is (nearly) a cube.

    A double root and a simple one (D_k) become the two axes, so that the cubic is l1^2 l2 in them; three
    simple roots (D4) give two axes; a cube (E_k) gives its root as the first axis, the complement is
    chosen afterwards by :func:`_shear`.
    """
    n = polynomial.n_variables
    cubic, _ = kernel_cubic(polynomial, np.zeros(n), np.eye(n)[:, rank:])
    if not np.linalg.norm(cubic) > 0:
        return np.eye(2, dtype=complex), False
    directions = _cubic_roots(cubic)
    if directions is None:
        return np.eye(2, dtype=complex), False

    def spread(a, b):
        return abs(np.linalg.det(np.column_stack([a, b])))

    pairs = [(0, 1, 2), (0, 2, 1), (1, 2, 0)]
    # three roots within a narrow cone: a (near) cube, E_k; its complement is chosen by the shear below. The
    # choice only costs conditioning, never the answer: every basis used here has condition below 1 / _APART
    cube = max(spread(directions[p[0]], directions[p[1]]) for p in pairs) < _APART
    closest = min(pairs, key=lambda p: spread(directions[p[0]], directions[p[1]]))

    def aligned(a, b):
        return b * (np.sign(np.vdot(a, b).real) or 1.0)

    first = directions[closest[0]] + aligned(directions[closest[0]], directions[closest[1]])
    if cube:
        first = cube_root_direction(cubic)
    first = first / np.linalg.norm(first)
    if real and np.linalg.norm(first.real) > 0.5:
        first = first.real / np.linalg.norm(first.real)
    second = directions[closest[2]]
    if real:
        second = second.real if np.linalg.norm(second.real) >= np.linalg.norm(second.imag) else second.imag
    second = second / np.linalg.norm(second)
    if cube or spread(first, second) < _APART:
        cube = True
        second = np.array([-np.conj(first[1]), np.conj(first[0])])
    basis = np.column_stack([first, second]).astype(complex)
    if abs(np.linalg.det(basis)) < _APART / 2:
        return np.eye(2, dtype=complex), False
    return basis, cube


#: A kernel form whose coefficients are at most this against g's largest on the plane vanishes (as for the cubic).
_FORM_ZERO = 1e-8


def _leading_form_basis(polynomial, rank, real):
    """For a corank-2 point whose kernel cubic vanishes: a basis of the kernel plane from the roots of the
    first form of degree >= 4 that does not (see :func:`_form_basis`), or None."""
    if polynomial.is_zero():
        return None, False
    size = max(float(np.max(np.abs(kernel_form(polynomial, rank, d)), initial=0.0))
               for d in range(2, polynomial.degree + 1))
    if not size > 0 or np.linalg.norm(kernel_form(polynomial, rank, 3)) > _FORM_ZERO * size:
        return None, False
    for degree in range(4, polynomial.degree + 1):
        form = kernel_form(polynomial, rank, degree)
        if np.linalg.norm(form) > _FORM_ZERO * size:
            return _form_basis(form, real)
    return None, False


def _balanced_with(polynomial, factors):
    """The polynomial in units u = factors * w (coefficients times factors^exponents)."""
    powers = np.prod(factors[None, :] ** polynomial.exponents, axis=1)
    return Polynomial(polynomial.exponents, polynomial.numeric_coefficients() * powers, polynomial.n_variables)


#: Terms smaller than this against the largest do not enter the fit of the units.
_FIT_RANGE = 1e-10


def _balanced(moved, n):
    """The diagonal units (powers of ten) that balance the Taylor coefficients, and g in them."""
    # the fit sees the terms within 10 decades of the largest: a kept term near rounding level would
    # otherwise pull the units to extremes (measured: a frame of condition 5e15 from one such term)
    magnitudes = np.abs(moved.numeric_coefficients())
    fitted = magnitudes >= _FIT_RANGE * np.max(magnitudes, initial=0.0)
    if not np.any(fitted):
        return np.ones(n), moved
    system = PolynomialSystem([f"u{j}" for j in range(n)],
                              [Polynomial(moved.exponents[fitted], moved.numeric_coefficients()[fitted], n)])
    # at most four decades per step: a fit on few terms can have a near null direction along which the units
    # run off (a frame of condition 4e19 from four terms was measured)
    factors = np.clip(Scaling.balancing(system).variable_factors, 1e-4, 1e4)
    return factors, _balanced_with(moved, factors)


def local_frame(polynomial, point, rank, real=False, rounding_level=_ROUNDING):
    """The local frame of f at a singular point for a Hessian of rank ``rank``.

    Parameters
    ----------
    polynomial : Polynomial
        Numeric, in computed (balanced) units.
    point : array_like of complex
    rank : int
        Numerical rank of the Hessian (from :func:`numag.anatomy.hypersurface.hessian_evidence`).
    real : bool
        f has real coefficients and the point is real: the frame is real (real slices stay real).
    rounding_level : float
        Terms of g at most this times their term sizes are dropped as rounding.

    Returns
    -------
    LocalFrame
    """
    point = np.asarray(point, dtype=complex)
    n = polynomial.n_variables
    f = polynomial.numeric()
    sizes, directions = _ordered_directions(frame_hessian(f, point), real)
    floor = sizes[0] * 1e-300 if len(sizes) and sizes[0] > 0 else 1e-300
    matrix = directions.copy()
    matrix[:, :rank] = directions[:, :rank] / np.sqrt(np.maximum(sizes[:rank], floor))[None, :]
    moved, rounding = _moved(f, matrix, point, rounding_level)
    factors, moved = _balanced(moved, n)
    matrix = matrix * factors[None, :]

    def sheared(matrix, movers, plane):
        shear = _shear(moved, movers, plane)
        shear = shear.real if real else shear
        if not np.any(shear != 0):
            return matrix, False
        matrix = matrix.copy()
        matrix[:, movers] = matrix[:, movers] + matrix[:, plane] @ shear
        return matrix, True

    matrix, changed = sheared(matrix, list(range(rank)), list(range(rank, n)))
    if changed:
        moved, rounding = _moved(f, matrix, point, rounding_level)
        factors, moved = _balanced(moved, n)
        matrix = matrix * factors[None, :]
    if n - rank == 2:
        basis, cube = _kernel_basis(moved, rank, real)
        matrix = matrix.copy()
        matrix[:, rank:] = matrix[:, rank:] @ (basis.real if real else basis)
        moved, rounding = _moved(f, matrix, point, rounding_level)
        factors, moved = _balanced(moved, n)
        matrix = matrix * factors[None, :]
        if cube:  # the complement of a cube's root: conjugate to the root's line
            matrix, changed = sheared(matrix, [rank + 1], [rank])
            if changed:
                moved, rounding = _moved(f, matrix, point, rounding_level)
                factors, moved = _balanced(moved, n)
                matrix = matrix * factors[None, :]
        for _ in range(2):  # a second pass from the first one's frame: the crowded roots are then found accurately
            basis, repeated = _leading_form_basis(moved, rank, real)
            if basis is None:
                break
            matrix = matrix.copy()
            matrix[:, rank:] = matrix[:, rank:] @ (basis.real if real else basis)
            moved, rounding = _moved(f, matrix, point, rounding_level)
            factors, moved = _balanced(moved, n)
            matrix = matrix * factors[None, :]
            if repeated:  # the complement of a repeated root: conjugate to the root's line
                matrix, changed = sheared(matrix, [rank + 1], [rank])
                if changed:
                    moved, rounding = _moved(f, matrix, point, rounding_level)
                    factors, moved = _balanced(moved, n)
                    matrix = matrix * factors[None, :]
    # the equation's own power of ten is a unit of f only: divide the largest coefficient out
    largest = float(np.max(np.abs(moved.numeric_coefficients()), initial=0.0))
    if largest > 0:
        moved = moved.scaled(1.0 / largest)
    # the rounding level in the frame's units: the same factors and the same division
    in_units = _balanced_with(rounding, factors)
    levels = np.abs(in_units.numeric_coefficients()) / largest if largest > 0 else np.full(in_units.n_terms, np.inf)
    noise = float(np.max(levels, initial=0.0))
    uncertainty = _uncertainty(f, matrix, point, moved.scaled(largest) if largest > 0 else moved)
    if largest > 0:
        uncertainty = uncertainty.scaled(1.0 / largest)
    return LocalFrame(point, matrix, moved, rank, float(np.linalg.cond(matrix)), noise,
                      in_units.exponents.sum(axis=1), levels, uncertainty)
