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
   Their volumes |det(b_i - a_i)| add up to the mixed volume. They are enumerated one support at
   a time, breadth first, pruning with the feasibility of linear programs on the normal, all
   programs of a level solved as one stack by numag's own simplex
   (:func:`~numag.numeric.feasibility.feasible_batch`; scipy's ``linprog`` with HiGHS is the
   reference, decision 0055).
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

from dataclasses import dataclass, field, replace
import enum

import numpy as np

from ..errors import InputError
from ..numeric.evaluate import BatchEvaluator, PrecisionEvaluator, TermSizes
from ..numeric.feasibility import feasible_batch
from ..system.polynomial import Polynomial
from .homotopy import _PatchedHomotopy
from .service import JUMP_PREDICTOR_ERROR_DIVISOR, JUMP_STEP_DIVISOR, JUMP_TOLERANCE, PathCounts, track
from .tracker import PathStatus, TrackerOptions

__all__ = ["MixedCell", "ZeroCoordinates", "LinearProgramSolver", "supports_of", "zero_coordinates_possible", "mixed_cells",
           "mixed_volume", "smith_normal_form", "binomial_solutions", "PolyhedralStart", "cell_powers",
           "PolyhedralHomotopy", "CELL_LABEL_UNIT", "track_cells"]

#: Linear programs one mixed-cell enumeration may solve before it gives up (a guard on the set-up cost).
MAX_LINEAR_PROGRAMS = 400_000


class ZeroCoordinates(enum.Enum):
    """How roots with zero coordinates are accounted for."""

    EXCLUDED = "excluded: for every variable an equation is a nonzero constant where it vanishes"
    ORIGIN_ADDED = "the origin was added to every support (roots in C^n, Li and Wang 1996)"


class LinearProgramSolver(enum.Enum):
    """Who decides the feasibility of the cell search's linear programs."""

    SIMPLEX = "numag's dense simplex (numag.numeric.feasibility)"
    HIGHS = "scipy's linprog with HiGHS (the reference: about 3 ms a call)"


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


@dataclass
class _EdgeRows:
    """Pairs {a, b} of one lifted support and the constraints on alpha making each the lowest pair.

    Every pair has one equality <b - a, alpha> = w(a) - w(b) and ``width`` inequalities
    <c - a, alpha> >= w(a) - w(c) for the other points c, padded with 0 <= 1 so that the programs
    of all supports stack into one array.
    """

    pairs: list
    equalities: np.ndarray  # (pairs, 1, n)
    equality_rhs: np.ndarray  # (pairs, 1)
    inequalities: np.ndarray  # (pairs, width, n)
    inequality_rhs: np.ndarray  # (pairs, width)

    @classmethod
    def of(cls, support, lifting, width):
        terms, n = support.shape
        pairs = [(a, b) for a in range(terms) for b in range(a + 1, terms)]
        equalities = np.empty((len(pairs), 1, n))
        equality_rhs = np.empty((len(pairs), 1))
        inequalities = np.zeros((len(pairs), width, n))
        inequality_rhs = np.ones((len(pairs), width))
        for k, (a, b) in enumerate(pairs):
            others = [c for c in range(terms) if c != a and c != b]
            equalities[k, 0] = support[b] - support[a]
            equality_rhs[k, 0] = lifting[a] - lifting[b]
            inequalities[k, :len(others)] = -(support[others] - support[a])
            inequality_rhs[k, :len(others)] = lifting[others] - lifting[a]
        return cls(pairs, equalities, equality_rhs, inequalities, inequality_rhs)

    def take(self, rows):
        """The pairs numbered ``rows`` only."""
        return _EdgeRows([self.pairs[r] for r in rows], self.equalities[rows], self.equality_rhs[rows],
                         self.inequalities[rows], self.inequality_rhs[rows])


class _Feasibility:
    """Feasibility of stacks of linear programs, with a count of the programs solved.

    Parameters
    ----------
    solver : LinearProgramSolver
    chunk : int
        Programs per call of the batched simplex (bounds its memory).
    """

    def __init__(self, solver=LinearProgramSolver.SIMPLEX, chunk=2048):
        self.solver = solver
        self.chunk = chunk
        self.solved = 0

    def __call__(self, equalities, equality_rhs, inequalities, inequality_rhs):
        """Feasible or not, for each program of the stacks (shapes as in ``feasible_batch``)."""
        count = len(equalities)
        self.solved += count
        if self.solved > MAX_LINEAR_PROGRAMS:
            raise InputError(f"the mixed-cell enumeration needed more than {MAX_LINEAR_PROGRAMS:,} linear programs; "
                             "use another start")
        if self.solver == LinearProgramSolver.SIMPLEX:
            return np.concatenate([np.zeros(0, dtype=bool)] + [
                feasible_batch(equalities[k:k + self.chunk], equality_rhs[k:k + self.chunk],
                               inequalities[k:k + self.chunk], inequality_rhs[k:k + self.chunk])
                for k in range(0, count, self.chunk)])
        n = equalities.shape[2]
        from scipy.optimize import linprog  # here, not at import: half a second that plain solves never use
        return np.array([linprog(np.zeros(n), A_ub=inequalities[k], b_ub=inequality_rhs[k], A_eq=equalities[k],
                                 b_eq=equality_rhs[k], bounds=(None, None), method="highs").status == 0
                         for k in range(count)], dtype=bool)


def mixed_cells(supports, liftings, solver=LinearProgramSolver.SIMPLEX):
    """The mixed cells of a lifting, depth first with linear-program pruning.

    Candidate edges of each support are its lower edges alone; a relation table says which
    candidate edges of two supports can lie in one cell (filled a row at a time, when the search
    first needs it); from the third support on, the programs of all children of a node are solved
    as one stack (at the last support the normal is fixed and the program is a check of signs).

    Parameters
    ----------
    supports : list of ndarray of int, shape (terms_i, n)
        n supports in Z^n (each with at least two points, else there is no cell).
    liftings : list of ndarray of float, shape (terms_i,)
        Generic (random) lifting values.
    solver : LinearProgramSolver
        The feasibility test (the default is the fast one; HIGHS is the reference).

    Returns
    -------
    (list of MixedCell, int)
        The cells and the number of linear programs solved.

    Examples
    --------
    >>> import numpy as np
    >>> triangle = np.array([[0, 0], [1, 0], [0, 1]])
    >>> cells, _ = mixed_cells([triangle, 2 * triangle], [np.array([0.3, 0.1, 0.7]), np.array([0.5, 0.2, 0.4])])
    >>> sum(cell.volume for cell in cells)   # a line meets a conic twice
    2
    """
    n = len(supports)
    if any(s.shape[1] != n for s in supports):
        raise InputError("a mixed volume needs n supports in n variables")
    feasible = _Feasibility(solver)
    width = max(len(s) for s in supports) - 2
    # the edges of each lifted support alone that are lower edges: the only candidates in a cell
    candidates = []
    for support, lifting in zip(supports, liftings):
        rows = _EdgeRows.of(support, lifting, width)
        lower = feasible(rows.equalities, rows.equality_rhs, rows.inequalities, rows.inequality_rhs)
        candidates.append(rows.take(np.nonzero(lower)[0]))
    order = sorted(range(n), key=lambda i: len(candidates[i].pairs))  # few candidates first: a narrow tree
    candidates = [candidates[i] for i in order]
    fields = ("equalities", "equality_rhs", "inequalities", "inequality_rhs")
    # the relation table: which edges of two supports can lie in one cell (a cheap filter before each
    # linear program of the search): table[p][q] (edges of p, edges of q), its rows solved when the
    # search first reaches an edge of p, all new rows of one level as one stack
    table = [{q: np.zeros((len(candidates[p].pairs), len(candidates[q].pairs)), dtype=bool) for q in range(p + 1, n)}
             for p in range(n)]
    known = [np.zeros(len(c.pairs), dtype=bool) for c in candidates]

    def fill_table(p, edges):
        new = edges[~known[p][edges]]
        if not len(new) or p + 1 == n:
            return
        first, second = [], []
        for q in range(p + 1, n):
            grid_e, grid_f = np.meshgrid(new, np.arange(len(candidates[q].pairs)), indexing="ij")
            first.append(grid_e.ravel())
            second.append((q, grid_f.ravel()))
        stacks = [np.concatenate([np.concatenate([getattr(candidates[p], field)[e], getattr(candidates[q], field)[f]],
                                                 axis=1) for e, (q, f) in zip(first, second)])
                  for field in fields]
        answers = feasible(*stacks)
        start = 0
        for e, (q, f) in zip(first, second):
            table[p][q][e, f] = answers[start:start + len(e)]
            start += len(e)
        known[p][new] = True

    # breadth first: the nodes of one level are (chosen edge numbers (P, depth), allowed edges of every
    # later support (P, edges of q)); all children of a level are tested as one stack
    chosen = np.zeros((1, 0), dtype=np.int64)
    allowed = {q: np.ones((1, len(candidates[q].pairs)), dtype=bool) for q in range(n)}
    for depth in range(n):
        node, edge = np.nonzero(allowed[depth])
        if depth >= 2 and len(node):
            # two edges were checked by the table; from three on, a linear program per child
            keep = np.zeros(len(node), dtype=bool)
            for start in range(0, len(node), feasible.chunk):
                part = slice(start, start + feasible.chunk)
                stacks = [np.concatenate([getattr(candidates[j], field)[chosen[node[part], j]] for j in range(depth)] +
                                         [getattr(candidates[depth], field)[edge[part]]], axis=1) for field in fields]
                keep[part] = feasible(*stacks)
            node, edge = node[keep], edge[keep]
        chosen = np.column_stack([chosen[node], edge])
        if depth + 1 == n:
            break
        fill_table(depth, np.unique(edge))
        narrowed = {q: allowed[q][node] & table[depth][q][edge] for q in range(depth + 1, n)}
        # a later support with no edge that fits: no cell below that node
        alive = np.all([narrowed[q].any(axis=1) for q in narrowed], axis=0)
        chosen = chosen[alive]
        allowed = {q: narrowed[q][alive] for q in narrowed}

    cells = []
    for row in chosen:
        pairs = [None] * n
        for depth, e in enumerate(row):
            pairs[order[depth]] = candidates[depth].pairs[e]
        matrix = np.array([supports[i][b] - supports[i][a] for i, (a, b) in enumerate(pairs)], dtype=np.int64)
        volume = abs(round(np.linalg.det(matrix.astype(float))))
        if volume == 0:
            continue
        rhs = np.array([liftings[i][a] - liftings[i][b] for i, (a, b) in enumerate(pairs)])
        normal = np.linalg.solve(matrix.astype(float), rhs)
        cells.append(MixedCell(tuple(pairs), normal, int(volume)))
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


#: The extra coordinate of a path of cell c is (c + 1) * CELL_LABEL_UNIT: a power of two, so that the
#: label and the means the endgame takes of it stay exact in double, and small beside the patch's
#: coordinates (1e-4 for 100,000 cells); the label is read back by rounding.
CELL_LABEL_UNIT = 2.0 ** -30
#: Rounds in which first-stage paths that reached no root of the random system go again on a fresh patch.
FIRST_STAGE_RETRIES = 3


def cell_powers(start, cell):
    """The powers of t of every term of the random system in one cell's homotopy (all equations in order).

    e_a = (<a, alpha> + w(a) - beta_i) / e_min, beta_i the smallest lifted value of equation i at the
    cell's normal alpha (reached on the cell's pair, whose powers are exactly 0) and e_min the
    smallest positive power of the cell (so that the first steps are of ordinary size).

    Examples
    --------
    >>> import numpy as np
    >>> from numag.system.parse import parse_system
    >>> system = parse_system(["x*y - 1", "x^2 + y^2 - 4"], ["x", "y"])
    >>> start = PolyhedralStart.random(system.polynomials, np.random.default_rng(0))
    >>> powers = cell_powers(start, start.cells[0])
    >>> bool(powers.min() == 0.0), bool(powers[powers > 0].min() == 1.0)
    (True, True)
    """
    powers = []
    for support, lifting, (a, b) in zip(start.supports, start.liftings, cell.pairs):
        lifted = support @ cell.normal + lifting
        power = np.maximum(lifted - lifted[a], 0.0)  # >= 0 up to rounding
        power[[a, b]] = 0.0  # exactly 0 on the pair: the binomial system at t = 0
        powers.append(power)
    powers = np.concatenate(powers)
    positive = powers[powers > 0]
    return powers / positive.min() if len(positive) else powers


@dataclass
class _SharedTerms:
    """The homogenised random system of a start and the evaluators of its terms (one per homotopy)."""

    target: list
    evaluator: BatchEvaluator
    sizes: TermSizes
    terms: BatchEvaluator
    term_polynomials: list
    _precise: object = None

    @classmethod
    def of(cls, start):
        n = len(start.supports)
        degrees = [int(s.sum(axis=1).max()) for s in start.supports]
        homogeneous = [np.column_stack([d - s.sum(axis=1), s]) for s, d in zip(start.supports, degrees)]
        target = [Polynomial(h, c, n + 1) for h, c in zip(homogeneous, start.coefficients)]
        polynomials = _term_polynomials(start)
        return cls(target, BatchEvaluator(target), TermSizes(target, projective=True, homogenized=True),
                   BatchEvaluator(polynomials), polynomials)

    def precise(self):
        """The terms' evaluator in mpmath (made when a path first needs the rescue)."""
        if self._precise is None:
            self._precise = PrecisionEvaluator(self.term_polynomials)
        return self._precise


class PolyhedralHomotopy(_PatchedHomotopy):
    """The polyhedral homotopy of every mixed cell of a start at once (tracker parameter s = 1 - t).

    For a path of cell c, H_i(X, t) = sum_a c_a t^e_ca X^(a homogenised) with the cell's powers
    e_ca (:func:`cell_powers`): at t = 0 (s = 1) the cell's binomial system, at t = 1 (s = 0) the
    random system. Paths are numbered cell after cell (path k belongs to the cell whose volumes,
    added up in order, first exceed k), and every point carries its cell: points are
    ``(X_0, X_1, ..., X_n, label)`` with label ``(c + 1) * CELL_LABEL_UNIT``, held fixed by a unit
    row of the Jacobian with zero value and zero s-derivative (the tracker hands the homotopy rows
    of points, never path numbers: the device of the parameter sweep, decision 0045). So paths of
    all cells share batches and every evaluation; the powers of t are looked up per row.

    Rows: the n equations, the label row, the patch (whose label entry is 0).

    Parameters
    ----------
    start : PolyhedralStart
    patch : ndarray, shape (n + 1,)
        The random patch a . X = 1 on (X_0, ..., X_n).

    Examples
    --------
    >>> import numpy as np
    >>> from numag.system.parse import parse_system
    >>> system = parse_system(["x*y - 1", "x^2 + y^2 - 4"], ["x", "y"])
    >>> start = PolyhedralStart.random(system.polynomials, np.random.default_rng(0))
    >>> family = PolyhedralHomotopy(start, np.array([0.3, 0.5 - 0.2j, 0.1j]))
    >>> points = family.start_solutions()
    >>> family.cell_of(points).tolist() == [k for k, cell in enumerate(start.cells) for _ in range(cell.volume)]
    True
    >>> values, _, _ = family.evaluate(points, np.ones(len(points)))   # the binomial systems at s = 1
    >>> bool(np.abs(values).max() < 1e-12)
    True
    """

    def __init__(self, start, patch):
        self.start = start
        n = len(start.supports)
        self.n = n
        self.size = n + 2
        self.patch = np.concatenate([np.asarray(patch, dtype=complex), [0.0]])
        self._shared = _SharedTerms.of(start)
        self.target, self.evaluator, self._sizes = self._shared.target, self._shared.evaluator, self._shared.sizes
        self.terms = self._shared.terms
        self.ends = np.cumsum([cell.volume for cell in start.cells])
        self.powers = np.array([cell_powers(start, cell) for cell in start.cells]).reshape(len(start.cells), -1)
        self.equation_of_term = np.concatenate([np.full(len(s), i) for i, s in enumerate(start.supports)])
        self._sum = np.zeros((len(self.equation_of_term), n), dtype=float)  # terms -> equations
        self._sum[np.arange(len(self.equation_of_term)), self.equation_of_term] = 1.0
        self._build_entries()
        self.evaluations = 0
        self.value_evaluations = 0

    @property
    def n_paths(self):
        """The mixed volume."""
        return int(self.ends[-1]) if len(self.ends) else 0

    def _build_entries(self):
        """Tables that give H and dH/dX from the terms' monomial values and each row's weights t^e.

        Every term T_a = c_a X^a (homogenised) reads its value from one monomial; each of its partial
        derivatives c_a a_j X^(a - e_j) is one entry: a monomial, the term whose weight it takes, and
        its place in the Jacobian. Summing the weighted entries by one product with a (entries x n (n + 1))
        matrix replaces a Jacobian per term (T x (n + 1) per point) and its contraction with the weights,
        which made the first stage slower per path than the second (decision 0070).
        """
        n = self.n
        position = {tuple(m): k for k, m in enumerate(self.terms.monomials.tolist())}
        value_monomial, value_coefficient = [], []
        entry_term, entry_monomial, entry_slot, entry_coefficient = [], [], [], []
        for term, (polynomial, equation) in enumerate(zip(self._shared.term_polynomials,
                                                           self.equation_of_term.tolist())):
            exponent, coefficient = polynomial.exponents[0], complex(polynomial.numeric_coefficients()[0])
            value_monomial.append(position[tuple(exponent.tolist())])
            value_coefficient.append(coefficient)
            for j in np.nonzero(exponent)[0].tolist():
                lowered = exponent.copy()
                lowered[j] -= 1
                entry_term.append(term)
                entry_monomial.append(position[tuple(lowered.tolist())])
                entry_slot.append(equation * (n + 1) + j)
                entry_coefficient.append(coefficient * exponent[j])
        self._value_monomial = np.array(value_monomial, dtype=np.int64)
        self._value_coefficient = np.array(value_coefficient, dtype=complex)
        self._entry_term = np.array(entry_term, dtype=np.int64)
        self._entry_monomial = np.array(entry_monomial, dtype=np.int64)
        self._entry_matrix = np.zeros((len(entry_term), n * (n + 1)), dtype=complex)
        self._entry_matrix[np.arange(len(entry_term)), entry_slot] = entry_coefficient

    def _term_values(self, monomials):
        """T_a = c_a X^a per row and term, from the monomial values (P, K)."""
        return monomials[:, self._value_monomial] * self._value_coefficient

    def cell_of(self, points):
        """The cell number of each point (from its label coordinate)."""
        labels = np.rint(np.real(points[:, -1]) / CELL_LABEL_UNIT).astype(np.int64) - 1
        return np.clip(labels, 0, len(self.ends) - 1)

    def start_solutions(self, indices=None):
        """The start points of paths ``indices`` (all by default): the cells' binomial solutions on the
        patch, each with its cell's label."""
        indices = np.arange(self.n_paths) if indices is None else np.asarray(indices)
        cells = np.searchsorted(self.ends, indices, side="right")
        affine = np.empty((len(indices), self.n), dtype=complex)
        for c in np.unique(cells):
            mine = cells == c
            first = self.ends[c] - self.start.cells[c].volume
            affine[mine] = self.start.cell_start(self.start.cells[c])[indices[mine] - first]
        points = np.column_stack([np.ones(len(indices), dtype=complex), affine, (cells + 1) * CELL_LABEL_UNIT])
        points[:, :-1] /= (points @ self.patch)[:, None]
        return points

    def affine(self, points):
        """X_1 / X_0, ..., X_n / X_0 (the label left out)."""
        with np.errstate(all="ignore"):
            return points[:, 1:-1] / points[:, :1]

    def _weights(self, points, s):
        """t^e and d(t^e)/dt per row and term, t = 1 - s (the powers of each row's cell).

        On the real segment t is real in [0, 1]. Off it (the endgame's loops around s = 0) t^e is
        the principal branch exp(e log t), holomorphic in the disc |s| < 1 that the loops stay in:
        the Cauchy endgame integrates a holomorphic homotopy, not the one of t = 1 - Re s.
        """
        s = np.asarray(s)
        powers = self.powers[self.cell_of(points)]
        if np.all(np.imag(s) == 0):
            t = np.clip(1 - np.real(s), 0.0, 1.0)[:, None]
        else:
            t = (1 - s.astype(complex))[:, None]
        with np.errstate(divide="ignore", invalid="ignore"):
            weight = t ** powers
            slope = powers * weight / t  # e t^(e - 1) without a second power (t = 0 is set below)
        # t = 0 (the start): t^0 = 1, and the slope of t^e is 1 for e = 1 (the smallest positive
        # power), 0 for e > 1 and for the pair's e = 0
        zero = t[:, 0] == 0
        if np.any(zero):
            weight[zero] = powers[zero] == 0
            slope[zero] = powers[zero] == 1
        slope = np.where(powers > 0, slope, 0.0)
        return weight, slope

    def evaluate(self, points, s):
        """H, dH/dX (label and patch rows included) and dH/ds at points (P, n + 2) and parameters s (P,)."""
        self.evaluations += 1
        count, size, n = len(points), self.size, self.n
        monomials = self.terms.monomial_values(points[:, :-1])
        term_values = self._term_values(monomials)
        weight, slope = self._weights(points, s)
        values = np.zeros((count, size), dtype=complex)
        values[:, :n] = (weight * term_values) @ self._sum
        values[:, -1] = points @ self.patch - 1
        jacobian = np.zeros((count, size, size), dtype=complex)
        entries = weight[:, self._entry_term] * monomials[:, self._entry_monomial]
        jacobian[:, :n, :n + 1] = (entries @ self._entry_matrix).reshape(count, n, n + 1)
        jacobian[:, n, n + 1] = 1.0
        jacobian[:, -1, :] = self.patch
        derivative = np.zeros((count, size), dtype=complex)
        derivative[:, :n] = -((slope * term_values) @ self._sum)  # d/ds = -d/dt
        return values, jacobian, derivative

    def evaluate_values(self, points, s):
        """H alone (label and patch rows included)."""
        self.value_evaluations += 1
        weight, _ = self._weights(points, s)
        values = np.zeros((len(points), self.size), dtype=complex)
        values[:, :self.n] = (weight * self._term_values(self.terms.monomial_values(points[:, :-1]))) @ self._sum
        values[:, -1] = points @ self.patch - 1
        return values

    def evaluate_precise(self, point, s, ctx):
        """H, dH/dX and dH/ds at one point in an mpmath context (the precision rescue's evaluation).

        The same sums as :meth:`evaluate`, term by term: H_i = sum_a t^e_a T_a(X), t = 1 - s; the
        label is read in double (it only names the cell).
        """
        size, n = self.size, self.n
        cell = int(np.clip(round(float(ctx.re(point[-1])) / CELL_LABEL_UNIT) - 1, 0, len(self.ends) - 1))
        term_values, term_jacobian = self._shared.precise().evaluate(list(point[:n + 1]), ctx)
        s = ctx.mpc(s)
        if ctx.im(s) == 0:  # the segment: t real in [0, 1], as in :meth:`_weights`
            t = min(max(1 - ctx.re(s), ctx.mpf(0)), ctx.mpf(1))
        else:
            t = 1 - s
        values, jacobian, derivative = ctx.matrix(size, 1), ctx.matrix(size, size), ctx.matrix(size, 1)
        for k, (equation, power) in enumerate(zip(self.equation_of_term.tolist(), self.powers[cell].tolist())):
            power = ctx.mpf(power)
            weight = t ** power if power > 0 else ctx.mpf(1)
            values[equation] += weight * term_values[k]
            if power > 0:  # d/ds = -d/dt
                derivative[equation] -= power * (t ** (power - 1) if power != 1 else 1) * term_values[k]
            for j in range(n + 1):
                jacobian[equation, j] += weight * term_jacobian[k, j]
        jacobian[n, n + 1] = 1  # the label row: value 0, the label never moves
        self._precise_patch_row(values, jacobian, point, ctx)
        return values, jacobian, derivative

    def row_scales(self, points):
        """Sizes of the random system's gradient terms, then 1 for the label row."""
        return np.column_stack([self._sizes.gradients(points[:, :-1]), np.ones(len(points))])

    def target_residual(self, points):
        """Scaled residual of the random system at points (P, n + 2)."""
        values = self.evaluator.evaluate(points[:, :-1], jacobian=False)
        return np.linalg.norm(values / self._sizes.values(points[:, :-1]), axis=1)

    def point_columns(self):
        """The columns of a point that are its coordinates (the label is not: paths of different cells
        may jump onto each other's endpoints)."""
        return slice(0, self.n + 1)


def _term_polynomials(start):
    """One polynomial per term of the homogenised random system."""
    n = len(start.supports)
    polynomials = []
    for support, coefficients in zip(start.supports, start.coefficients):
        degree = int(support.sum(axis=1).max())
        for a, c in zip(support, coefficients):
            polynomials.append(Polynomial(np.concatenate([[degree - a.sum()], a])[None, :], [c], n + 1))
    return polynomials


def track_cells(start, rng, options=None, batch_size=4096, executor=None, progress=None):
    """Solve the random system of ``start`` by tracking every mixed cell's paths (one patch for all).

    The paths of all cells are one homotopy (:class:`PolyhedralHomotopy`: each point carries its
    cell, so a batch holds paths of many cells, tracked together) and go through
    :func:`~numag.tracking.service.track` like those of any homotopy: batches on the
    executor, the cautious retry and the precision rescue of failed paths, and the repair of
    paths that jumped onto another's endpoint (the random system's solutions are all regular
    and distinct).

    Parameters
    ----------
    start : PolyhedralStart
    rng : numpy.random.Generator
        For the patch.
    options : TrackerOptions, optional
    batch_size : int
    executor : Executor or callable, optional
        As for :func:`~numag.tracking.service.track` (None: in this process).
    progress : Progress, optional
        Told the paths done and in all, as by :func:`~numag.tracking.service.track`.

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
    homotopy = PolyhedralHomotopy(start, patch)
    # The random system's roots are all simple (generic coefficients), but some are badly scaled: cyclic 8
    # at seed 1 has eight with coordinates from 2e-4 to 900, projective condition 3e9. Judged by the
    # condition they were "singular", went to the Cauchy endgame (8,000 steps each) and were lost. Here an
    # endpoint is regular when Newton settles on it (quadratically, to 1e-13): the one test that fits.
    options = replace(options or TrackerOptions(), singular_condition=np.inf)
    if homotopy.n_paths == 0:
        return np.zeros((0, n), dtype=complex), PathCounts()
    run = track(homotopy, homotopy.start_solutions, options, count=homotopy.n_paths, executor=executor,
                batch_size=batch_size, progress=progress)
    regular = (run.status == PathStatus.CONVERGED) | (run.status == PathStatus.SINGULAR_ENDPOINT)
    points = homotopy.affine(run.endpoints)
    status, retracked, digits = run.status.copy(), run.retracked.copy(), run.digits.copy()
    for round_ in range(1, FIRST_STAGE_RETRIES + 1):
        lost = np.flatnonzero(~regular)
        if len(lost) == 0:
            break
        # Every root of the random system is finite and regular (generic coefficients), so a path that ends at
        # infinity or fails jumped, onto the solutions at infinity of the homogenised homotopy: the cone over a
        # plane cubic's square null-vector system (seed 3) lost 1 or 2 of a cell's 6 paths there, after 11 to
        # 22 steps, on 4 random patches of 6. Those paths go again from their start points on another random
        # patch with the jump repair's smaller steps (decision 0034); an end on a root already reached is a
        # jump and stays lost.
        patch = (rng.standard_normal(n + 1) + 1j * rng.standard_normal(n + 1)) / np.sqrt(2 * (n + 1))
        cautious = replace(options, max_step=options.max_step / JUMP_STEP_DIVISOR ** round_,
                           predictor_error=options.predictor_error / JUMP_PREDICTOR_ERROR_DIVISOR ** round_)
        again = PolyhedralHomotopy(start, patch)
        retry = track(again, lambda indices, lost=lost, again=again: again.start_solutions(lost[indices]),
                      cautious, count=len(lost), executor=executor, batch_size=batch_size)
        reached = (retry.status == PathStatus.CONVERGED) | (retry.status == PathStatus.SINGULAR_ENDPOINT)
        ends = again.affine(retry.endpoints)
        known = points[regular]
        for k in np.flatnonzero(reached):
            scale = 1.0 + np.abs(ends[k]).max()
            if len(known) and np.abs(known - ends[k]).max(axis=1).min() <= JUMP_TOLERANCE * scale:
                reached[k] = False
                retry.status[k] = PathStatus.FAILED_JUMP
            else:
                known = np.vstack([known, ends[k][None, :]])
        status[lost], retracked[lost], digits[lost] = retry.status, True, retry.digits
        points[lost[reached]] = ends[reached]
        regular[lost[reached]] = True
    counts = PathCounts.of(status, retracked, digits, run.jump_retracks)
    return points[regular], counts
