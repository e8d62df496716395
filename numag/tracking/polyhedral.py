"""Polyhedral starts: mixed volume, mixed cells of a random lifting, binomial systems, polyhedral homotopy.

A system whose equation i has the monomials A_i (its support) and generic coefficients has
exactly MV(A_1, ..., A_n) solutions with no zero coordinate, the mixed volume of the Newton
polytopes (Bernstein's theorem; the BKK bound). The polyhedral method (Huber and Sturmfels
1995, "A polyhedral method for solving sparse polynomial systems", Math. Comp.; T. Y. Li, "Numerical
solution of polynomial systems by homotopy continuation methods", Handbook of Numerical Analysis
XI, 2003; both from memory) finds them:

1. Lift every exponent a of A_i to (a, w_i(a)) with random w. The lower facets of the lifted
   Minkowski sum give a subdivision; its *mixed cells* pick one edge {a_i, b_i} of every A_i with
   an inner normal (alpha, 1): <a, alpha> + w_i(a) is smallest on A_i exactly at a_i and b_i.
   Their volumes |det(b_i - a_i)| add up to the mixed volume. They are enumerated depth first,
   one support at a time, pruning with the feasibility of a linear program (scipy's ``linprog``,
   HiGHS) on the normal.
2. With x = y t^alpha and each equation divided by its smallest power of t, the random system
   sum_a c_a x^a t^w(a) becomes at t = 0 the binomial system c_ai y^a_i + c_bi y^b_i = 0, whose
   |det| solutions are written down from the Smith normal form of the exponent matrix
   (:func:`binomial_solutions`). The powers of t are divided by the smallest positive one, so
   the first steps are not tiny (the usual reparametrisation), and every cell's paths are tracked
   from t = 0 to t = 1 by the batched tracker; their ends solve the random system.
3. The caller then moves the random coefficients to the system's own with a parameter homotopy.

Roots with zero coordinates: the mixed volume counts roots in (C*)^n. Adding the origin (a
constant term) to every support makes it count every isolated root in C^n (Li and Wang 1996,
"The BKK root count in C^n", Math. Comp.; from memory). :func:`zero_coordinates_possible`
shifts only when needed: if for every variable some equation reduces to a nonzero constant
when that variable is zero (as x_1 ... x_n - 1 does), no root has a zero coordinate, and the
supports are kept as they are.

Examples
--------
>>> import numpy as np
>>> square = np.array([[0, 0], [1, 0], [0, 1], [1, 1]])       # 1, x, y, x y
>>> triangle = np.array([[0, 0], [2, 0], [0, 1]])            # 1, x^2, y
>>> mixed_volume([square, triangle], np.random.default_rng(0))
3
"""

from dataclasses import dataclass, field
import enum

import numpy as np

from ..errors import InputError
from ..numeric.evaluate import BatchEvaluator, TermSizes
from ..system.polynomial import Polynomial
from .homotopy import _PatchedHomotopy
from .service import PathCounts, track
from .tracker import PathStatus

__all__ = ["MixedCell", "ZeroCoordinates", "supports_of", "zero_coordinates_possible", "mixed_cells",
           "mixed_volume", "smith_normal_form", "binomial_solutions", "PolyhedralStart", "CellHomotopy",
           "term_evaluator", "track_cells"]

#: Linear programs one mixed-cell enumeration may solve before it gives up (a guard on the set-up cost).
MAX_LINEAR_PROGRAMS = 400_000


class ZeroCoordinates(enum.Enum):
    """How roots with zero coordinates are accounted for."""

    EXCLUDED = "excluded: for every variable an equation is a nonzero constant where it vanishes"
    ORIGIN_ADDED = "the origin was added to every support (roots in C^n, Li and Wang 1996)"


@dataclass(frozen=True)
class MixedCell:
    """One mixed cell: an edge (a pair of term numbers) of every support, its normal and volume.

    Attributes
    ----------
    pairs : tuple of (int, int)
        For support i, the row numbers of a_i and b_i in it.
    normal : ndarray of float, shape (n,)
        alpha: <a, alpha> + w_i(a) is smallest on support i exactly at the pair.
    volume : int
        |det(b_i - a_i)|, the number of paths the cell starts.
    """

    pairs: tuple
    normal: np.ndarray = field(repr=False)
    volume: int


def supports_of(polynomials):
    """The exponent arrays (terms, n) of affine polynomials."""
    return [np.asarray(p.exponents, dtype=np.int64) for p in polynomials]


def zero_coordinates_possible(polynomials):
    """False when no root can have a zero coordinate (see the module docstring), else True.

    Examples
    --------
    >>> from numag.system.parse import parse_system
    >>> zero_coordinates_possible(parse_system(["x + y", "x*y - 1"], ["x", "y"]).polynomials)
    False
    >>> zero_coordinates_possible(parse_system(["x + y", "x - y - 1"], ["x", "y"]).polynomials)
    True
    """
    n = polynomials[0].n_variables
    for j in range(n):
        excluded = False
        for p in polynomials:
            constant = np.all(p.exponents == 0, axis=1)
            # every other term contains x_j, and a nonzero constant term: p = c != 0 where x_j = 0
            if constant.any() and np.all(constant | (p.exponents[:, j] > 0)):
                excluded = True
                break
        if not excluded:
            return True
    return False


def _lower_edge_rows(support, lifting, a, b, n):
    """Constraints on alpha making {a, b} the lowest pair of one lifted support: (A_eq, b_eq, A_ub, b_ub)."""
    others = np.array([c for c in range(len(support)) if c != a and c != b], dtype=np.int64)
    equality = (support[b] - support[a])[None, :].astype(float)
    equality_rhs = np.array([lifting[a] - lifting[b]])
    upper = -(support[others] - support[a]).astype(float).reshape(len(others), n)
    upper_rhs = lifting[others] - lifting[a]
    return equality, equality_rhs, upper, upper_rhs


class _Feasibility:
    """Feasibility of sets of lower-edge constraints, with a count of the linear programs solved."""

    def __init__(self, n):
        self.n = n
        self.solved = 0

    def __call__(self, rows):
        self.solved += 1
        if self.solved > MAX_LINEAR_PROGRAMS:
            raise InputError(f"the mixed-cell enumeration needed more than {MAX_LINEAR_PROGRAMS:,} linear programs; "
                             "use another start")
        a_eq = np.vstack([r[0] for r in rows])
        b_eq = np.concatenate([r[1] for r in rows])
        uppers = [r[2] for r in rows if len(r[2])]
        a_ub = np.vstack(uppers) if uppers else None
        b_ub = np.concatenate([r[3] for r in rows if len(r[2])]) if uppers else None
        from scipy.optimize import linprog  # here, not at import: half a second that plain solves never use
        result = linprog(np.zeros(self.n), A_ub=a_ub, b_ub=b_ub, A_eq=a_eq, b_eq=b_eq, bounds=(None, None),
                         method="highs")
        return result.status == 0


def _cell_normal(rows, slack=1e-9):
    """The normal fixed by n edge equations if it satisfies every inequality (else None)."""
    matrix = np.vstack([r[0] for r in rows])
    rhs = np.concatenate([r[1] for r in rows])
    try:
        normal = np.linalg.solve(matrix, rhs)
    except np.linalg.LinAlgError:  # parallel edges: a cell of volume 0
        return None
    for _, _, upper, upper_rhs in rows:
        if len(upper) and np.any(upper @ normal > upper_rhs + slack * (1 + np.abs(upper_rhs))):
            return None
    return normal


def mixed_cells(supports, liftings):
    """The mixed cells of a lifting, depth first with linear-program pruning.

    Parameters
    ----------
    supports : list of ndarray of int, shape (terms_i, n)
        n supports in Z^n (each with at least two points, else there is no cell).
    liftings : list of ndarray of float, shape (terms_i,)
        Generic (random) lifting values.

    Returns
    -------
    (list of MixedCell, int)
        The cells and the number of linear programs solved.
    """
    n = len(supports)
    if any(s.shape[1] != n for s in supports):
        raise InputError("a mixed volume needs n supports in n variables")
    feasible = _Feasibility(n)
    # the edges of each lifted support alone that are lower edges: the only candidates in a cell
    candidates = []
    for support, lifting in zip(supports, liftings):
        edges = []
        for a in range(len(support)):
            for b in range(a + 1, len(support)):
                rows = _lower_edge_rows(support, lifting, a, b, n)
                if feasible([rows]):
                    edges.append((a, b, rows))
        candidates.append(edges)
    order = sorted(range(n), key=lambda i: len(candidates[i]))  # few candidates first: a narrow tree
    candidates = [candidates[i] for i in order]
    # the relation table: which edges of two supports can lie in one cell (a cheap filter before each
    # linear program of the search; most of the pruning happens here), filled only where the search asks
    related = {}

    def compatible(p, e, q, f):
        key = (p, e, q, f)
        if key not in related:
            related[key] = feasible([candidates[p][e][2], candidates[q][f][2]])
        return related[key]

    cells = []

    def extend(depth, chosen, rows, allowed):
        if depth == n:
            pairs = [None] * n
            for i, (a, b) in zip(order, chosen):
                pairs[i] = (a, b)
            matrix = np.array([supports[i][b] - supports[i][a] for i, (a, b) in enumerate(pairs)], dtype=np.int64)
            volume = abs(round(np.linalg.det(matrix.astype(float))))
            if volume == 0:
                return
            rhs = np.array([liftings[i][a] - liftings[i][b] for i, (a, b) in enumerate(pairs)])
            normal = np.linalg.solve(matrix.astype(float), rhs)
            cells.append(MixedCell(tuple(pairs), normal, int(volume)))
            return
        for e in np.nonzero(allowed[depth])[0]:
            a, b, edge_rows = candidates[depth][e]
            together = rows + [edge_rows]
            if depth == n - 1 and depth >= 2:
                # the last edge fixes the normal: solve for it and test the inequalities, no linear program
                if _cell_normal(together) is not None:
                    extend(depth + 1, chosen + [(a, b)], together, allowed)
                continue
            # two edges were checked by the table; from three on a linear program decides
            if depth >= 2 and not feasible(together):
                continue
            narrowed = list(allowed)
            for later in range(depth + 1, n):
                narrowed[later] = allowed[later].copy()
                for f in np.nonzero(allowed[later])[0]:
                    narrowed[later][f] = compatible(depth, e, later, f)
                if not narrowed[later].any():  # no edge of a later support fits: no cell below this one
                    break
            else:
                extend(depth + 1, chosen + [(a, b)], together, narrowed)

    extend(0, [], [], [np.ones(len(c), dtype=bool) for c in candidates])
    return cells, feasible.solved


def mixed_volume(supports, rng):
    """MV(conv A_1, ..., conv A_n) as the total volume of the mixed cells of a random lifting.

    Examples
    --------
    >>> import numpy as np
    >>> line = np.array([[0, 0], [1, 0], [0, 1]])
    >>> mixed_volume([line, line], np.random.default_rng(1))  # two generic lines meet once
    1
    """
    liftings = [rng.random(len(s)) for s in supports]
    cells, _ = mixed_cells([np.asarray(s, dtype=np.int64) for s in supports], liftings)
    return sum(c.volume for c in cells)


def smith_normal_form(matrix):
    """Unimodular U, W and diagonal D with U M W = D, for a square nonsingular integer matrix M.

    Only the diagonal form is needed (the divisibility of the diagonal is not enforced).
    Python integers throughout, so the factors are exact.

    Examples
    --------
    >>> u, d, w = smith_normal_form([[2, 4], [6, 8]])
    >>> import numpy as np
    >>> bool(np.array_equal(np.array(u) @ np.array([[2, 4], [6, 8]]) @ np.array(w), np.array(d)))
    True
    >>> abs(d[0][0] * d[1][1])
    8
    """
    m = [[int(v) for v in row] for row in matrix]
    n = len(m)
    u = [[int(i == j) for j in range(n)] for i in range(n)]
    w = [[int(i == j) for j in range(n)] for i in range(n)]
    for t in range(n):
        while True:
            entries = [(abs(m[i][j]), i, j) for i in range(t, n) for j in range(t, n) if m[i][j]]
            if not entries:
                raise InputError("the exponent matrix of a binomial system is singular")
            _, i, j = min(entries)
            m[t], m[i] = m[i], m[t]
            u[t], u[i] = u[i], u[t]
            for row in m:
                row[t], row[j] = row[j], row[t]
            for row in w:
                row[t], row[j] = row[j], row[t]
            clean = True
            pivot = m[t][t]
            for i in range(t + 1, n):  # rows: m_i -= q m_t
                q = m[i][t] // pivot
                if q:
                    m[i] = [x - q * y for x, y in zip(m[i], m[t])]
                    u[i] = [x - q * y for x, y in zip(u[i], u[t])]
                clean &= m[i][t] == 0
            for j in range(t + 1, n):  # columns: c_j -= q c_t
                q = m[t][j] // pivot
                if q:
                    for row in m:
                        row[j] -= q * row[t]
                    for row in w:
                        row[j] -= q * row[t]
                clean &= m[t][j] == 0
            if clean:
                break
        if m[t][t] < 0:  # a positive diagonal
            m[t] = [-x for x in m[t]]
            u[t] = [-x for x in u[t]]
    return u, m, w


def binomial_solutions(exponents, right_hand_side):
    """Every x in (C*)^n with prod_j x_j^V_ij = beta_i, |det V| of them.

    With U V W = D (Smith normal form) and y = log x = W u, the system is D u = U log beta
    + 2 pi i m for integer vectors m, so u_l = ((U log beta)_l + 2 pi i m_l) / d_l with
    m_l = 0, ..., d_l - 1.

    Examples
    --------
    >>> import numpy as np
    >>> roots = binomial_solutions([[2, 0], [1, 1]], [4.0, 6.0])   # x^2 = 4, x y = 6
    >>> np.round(roots[np.argsort(roots[:, 0].real)].real, 9).tolist()
    [[-2.0, -3.0], [2.0, 3.0]]
    """
    u, d, w = smith_normal_form(exponents)
    u, w = np.array(u, dtype=float), np.array(w, dtype=float)
    diagonal = np.array([d[k][k] for k in range(len(d))], dtype=np.int64)
    logs = u @ np.log(np.asarray(right_hand_side, dtype=complex))
    grids = np.meshgrid(*[np.arange(k) for k in diagonal], indexing="ij")
    turns = np.stack([g.reshape(-1) for g in grids], axis=1)  # (prod d, n)
    coordinates = (logs[None, :] + 2j * np.pi * turns) / diagonal[None, :]
    return np.exp(coordinates @ w.T)


@dataclass
class PolyhedralStart:
    """A random system on the given supports and the mixed cells of a random lifting.

    Attributes
    ----------
    supports : list of ndarray of int
        A_i (with the origin added when ``zero_coordinates`` says so).
    coefficients : list of ndarray of complex
        The random system's coefficients, term by term.
    liftings : list of ndarray of float
    cells : list of MixedCell
    zero_coordinates : ZeroCoordinates
    linear_programs : int
        Linear programs solved to find the cells.
    """

    supports: list
    coefficients: list
    liftings: list
    cells: list
    zero_coordinates: ZeroCoordinates
    linear_programs: int = 0

    @classmethod
    def random(cls, polynomials, rng):
        """Random coefficients and lifting on the supports of square affine ``polynomials``.

        Examples
        --------
        >>> from numag.system.parse import parse_system
        >>> import numpy as np
        >>> system = parse_system(["x*y - 1", "x^2 + y^2 - 4"], ["x", "y"])
        >>> PolyhedralStart.random(system.polynomials, np.random.default_rng(0)).n_paths
        4
        """
        polynomials = list(polynomials)
        if len(polynomials) != polynomials[0].n_variables:
            raise InputError("a polyhedral start needs a square affine system")
        supports = supports_of(polynomials)
        zeros = ZeroCoordinates.EXCLUDED
        if zero_coordinates_possible(polynomials):
            zeros = ZeroCoordinates.ORIGIN_ADDED
            origin = np.zeros((1, len(polynomials)), dtype=np.int64)
            supports = [s if np.any(np.all(s == 0, axis=1)) else np.vstack([origin, s]) for s in supports]
        for k, support in enumerate(supports, 1):
            if len(support) < 2:
                raise InputError(f"equation {k} has a single term: its solutions have zero coordinates only "
                                 "or none; use another start")
        coefficients = [(rng.standard_normal(len(s)) + 1j * rng.standard_normal(len(s))) / np.sqrt(2)
                        for s in supports]
        liftings = [rng.random(len(s)) for s in supports]
        cells, solved = mixed_cells(supports, liftings)
        return cls(supports, coefficients, liftings, cells, zeros, solved)

    @property
    def n_paths(self):
        """The mixed volume (of the supports, the origin included when it was added)."""
        return sum(c.volume for c in self.cells)

    def random_polynomials(self):
        """The random system sum_a c_a x^a (affine), equation by equation."""
        n = len(self.supports)
        return [Polynomial(s, c, n) for s, c in zip(self.supports, self.coefficients)]

    def cell_start(self, cell):
        """The binomial system's solutions of one cell (affine, shape (volume, n))."""
        exponents, right = [], []
        for support, coefficients, (a, b) in zip(self.supports, self.coefficients, cell.pairs):
            exponents.append(support[b] - support[a])
            right.append(-coefficients[a] / coefficients[b])  # c_a y^a + c_b y^b = 0
        return binomial_solutions(exponents, right)


class CellHomotopy(_PatchedHomotopy):
    """The polyhedral homotopy of one mixed cell on a random patch (tracker parameter s = 1 - t).

    H_i(X, t) = sum_a c_a t^e_a X^(a homogenised), where e_a = (<a, alpha> + w(a) - beta_i) / e_min
    with beta_i the smallest lifted value of equation i at the cell's normal and e_min the smallest
    positive exponent of the cell. At t = 0 (s = 1) it is the cell's binomial system; at t = 1
    (s = 0) the random system.

    Parameters
    ----------
    start : PolyhedralStart
    cell : MixedCell
    patch : ndarray, shape (n + 1,)
    terms : BatchEvaluator, optional
        The evaluator of the random system's terms, one polynomial per term (shared by the cells).
    """

    def __init__(self, start, cell, patch, terms=None):
        self.start, self.cell = start, cell
        self.patch = np.asarray(patch, dtype=complex)
        self.size = len(self.patch)
        n = self.size - 1
        degrees = [int(s.sum(axis=1).max()) for s in start.supports]
        homogeneous = [np.column_stack([d - s.sum(axis=1), s]) for s, d in zip(start.supports, degrees)]
        self.target = [Polynomial(h, c, n + 1) for h, c in zip(homogeneous, start.coefficients)]
        self.terms = terms or term_evaluator(start)
        self.evaluator = BatchEvaluator(self.target)
        powers = []
        for support, lifting, (a, b) in zip(start.supports, start.liftings, cell.pairs):
            lifted = support @ cell.normal + lifting
            power = np.maximum(lifted - lifted[a], 0.0)  # >= 0 up to rounding
            power[[a, b]] = 0.0  # exactly 0 on the pair: the binomial system at t = 0
            powers.append(power)
        powers = np.concatenate(powers)
        positive = powers[powers > 0]
        self.powers = powers / positive.min() if len(positive) else powers
        self.equation_of_term = np.concatenate([np.full(len(s), i) for i, s in enumerate(start.supports)])
        self._sum = np.zeros((len(self.powers), n), dtype=float)  # terms -> equations
        self._sum[np.arange(len(self.powers)), self.equation_of_term] = 1.0
        self.evaluations = 0
        self.value_evaluations = 0
        self._sizes = TermSizes(self.target, projective=True, homogenized=True)

    def start_solutions(self, path_indices=None):
        """The binomial system's solutions (homogeneous, on the patch)."""
        affine = self.start.cell_start(self.cell)
        if path_indices is not None:
            affine = affine[np.asarray(path_indices)]
        points = np.column_stack([np.ones(len(affine), dtype=complex), affine])
        return points / (points @ self.patch)[:, None]

    def _weights(self, s):
        t = (1 - np.real(s))[:, None]
        t = np.clip(t, 0.0, 1.0)
        with np.errstate(divide="ignore", invalid="ignore"):
            weight = t ** self.powers[None, :]
            slope = np.where(self.powers[None, :] > 0, self.powers[None, :] * t ** (self.powers[None, :] - 1), 0.0)
        return weight, slope

    def evaluate(self, points, s):
        """H, dH/dX (with the patch row) and dH/ds at points (P, n + 1) and parameters s (P,)."""
        self.evaluations += 1
        count, size = len(points), self.size
        term_values, term_jacobian = self.terms.evaluate(points)
        weight, slope = self._weights(np.asarray(s))
        values = np.empty((count, size), dtype=complex)
        values[:, :-1] = (weight * term_values) @ self._sum
        values[:, -1] = points @ self.patch - 1
        jacobian = np.empty((count, size, size), dtype=complex)
        jacobian[:, :-1, :] = np.einsum("pt,ti,ptc->pic", weight, self._sum, term_jacobian, optimize=True)
        jacobian[:, -1, :] = self.patch
        derivative = np.zeros((count, size), dtype=complex)
        derivative[:, :-1] = -((slope * term_values) @ self._sum)  # d/ds = -d/dt
        return values, jacobian, derivative

    def evaluate_values(self, points, s):
        """H alone (with the patch row)."""
        self.value_evaluations += 1
        weight, _ = self._weights(np.asarray(s))
        values = np.empty((len(points), self.size), dtype=complex)
        values[:, :-1] = (weight * self.terms.evaluate(points, jacobian=False)) @ self._sum
        values[:, -1] = points @ self.patch - 1
        return values


def term_evaluator(start):
    """One polynomial per term of the homogenised random system (values and gradients of every term)."""
    n = len(start.supports)
    polynomials = []
    for support, coefficients in zip(start.supports, start.coefficients):
        degree = int(support.sum(axis=1).max())
        for a, c in zip(support, coefficients):
            polynomials.append(Polynomial(np.concatenate([[degree - a.sum()], a])[None, :], [c], n + 1))
    return BatchEvaluator(polynomials)


def track_cells(start, rng, options=None, batch_size=4096):
    """Solve the random system of ``start`` by tracking every mixed cell's paths (one patch for all).

    Parameters
    ----------
    start : PolyhedralStart
    rng : numpy.random.Generator
        For the patch.
    options : TrackerOptions, optional
    batch_size : int

    Returns
    -------
    (ndarray, PathCounts)
        The affine solutions of the random system reached (shape (M, n), M at most the mixed
        volume) and the paths of this stage by how they ended.

    Examples
    --------
    >>> import numpy as np
    >>> from numag.system.parse import parse_system
    >>> system = parse_system(["x*y - 1", "x^2 + y^2 - 4"], ["x", "y"])
    >>> start = PolyhedralStart.random(system.polynomials, np.random.default_rng(0))
    >>> points, counts = track_cells(start, np.random.default_rng(1))
    >>> points.shape, counts.converged
    ((4, 2), 4)
    """
    n = len(start.supports)
    patch = (rng.standard_normal(n + 1) + 1j * rng.standard_normal(n + 1)) / np.sqrt(2 * (n + 1))
    terms = term_evaluator(start)
    found, counts = [], PathCounts()
    for cell in start.cells:
        homotopy = CellHomotopy(start, cell, patch, terms)
        # cells are tracked one after another, each as one batch (their paths differ in the powers of t)
        run = track(homotopy, homotopy.start_solutions(), options, batch_size=batch_size)
        counts = counts + run.counts
        regular = (run.status == PathStatus.CONVERGED) | (run.status == PathStatus.SINGULAR_ENDPOINT)
        found.append(run.affine_endpoints()[regular])
    return (np.vstack(found) if found else np.zeros((0, n), dtype=complex)), counts
