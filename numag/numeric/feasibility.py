"""Feasibility of small systems of linear equations and inequalities, by a dense simplex of our own.

The mixed-cell search of the polyhedral start asks tens of thousands of times whether some
alpha in R^n (n up to about 10) satisfies E alpha = e and G alpha <= g with a few dozen rows.
A general solver spends most of its time setting up (scipy's ``linprog`` with HiGHS: about 2 to
3 ms a call, decision 0055); these programs are small enough for a dense tableau in numpy, and
many of them have the same shape (the same numbers of rows), so :func:`feasible_batch` solves a
stack of them at once, every pivot one numpy operation on the whole stack.

Method (common practice, no source beyond textbook linear programming, e.g. Chvatal, "Linear
Programming", 1983, from memory):

1. The equalities are eliminated: alpha = alpha_0 + N z with N an orthonormal basis of E's null
   space (an SVD); an inconsistent E alpha = e is infeasible. What is left is M z <= r in d unknowns.
2. d = 0 and d = 1 are decided directly (a sign, an interval).
3. Otherwise Farkas' lemma: M z <= r has no solution exactly when some y >= 0 has M^T y = 0 and
   r^T y < 0. With y normalised by 1^T y = 1 this is a linear program in standard form with
   d + 1 rows, min r^T y subject to [M^T; 1^T] y = (0, 1), y >= 0, solved by the two-phase
   simplex with Bland's rule (these programs are very degenerate: all but one right-hand side is
   zero, and Bland's rule cannot cycle). Phase 2 stops as soon as a basic y with r^T y < 0 appears
   (a certificate of infeasibility); an empty set of such y, or a minimum >= 0, means feasible.
   A program that has not finished after :data:`MAX_PIVOTS` pivots (rounding can make Bland's
   rule cycle) is handed to scipy's ``linprog``.

Examples
--------
>>> import numpy as np
>>> square = np.array([[1.0, 0], [-1, 0], [0, 1], [0, -1]])
>>> feasible(np.zeros((0, 2)), np.zeros(0), square, np.ones(4))         # |x| <= 1, |y| <= 1
True
>>> feasible(np.array([[1.0, 1.0]]), np.array([3.0]), square, np.ones(4))  # and x + y = 3
False
"""

import numpy as np

__all__ = ["feasible", "feasible_batch", "TOLERANCE", "MAX_PIVOTS"]

#: Slack allowed on the inequalities, relative to the size of their right-hand sides.
TOLERANCE = 1e-9
#: Pivots per phase after which a program goes to scipy's linprog instead.
MAX_PIVOTS = 500
#: Entries below this are zero in the pivoting rules.
_ZERO = 1e-12


def _simplex(tableau, basis, active, n_columns, stop_below=None):
    """Minimise each stack entry's last row over its first ``n_columns`` columns, Bland's rule, in place.

    ``tableau`` (B, rows + 1, columns) holds constraint rows and, last, the reduced costs with minus
    the objective in the last column; ``basis`` (B, rows) the basic column of each row. Only the
    entries marked ``active`` are pivoted. Returns (optimal, stopped, unfinished): boolean arrays
    (B,) of entries that reached an optimum, whose objective fell below ``stop_below`` (B,) or
    which were unbounded (both mean "stopped"), and that hit :data:`MAX_PIVOTS`.
    """
    count, rows = basis.shape
    optimal = np.zeros(count, dtype=bool)
    stopped = np.zeros(count, dtype=bool)
    active = active.copy()
    for _ in range(MAX_PIVOTS):
        if stop_below is not None:
            below = active & (-tableau[:, -1, -1] < stop_below)
            stopped |= below
            active &= ~below
        negative = tableau[:, -1, :n_columns] < -_ZERO
        done = active & ~negative.any(axis=1)
        optimal |= done
        active &= ~done
        if not active.any():
            return optimal, stopped, active
        index = np.nonzero(active)[0]
        column = np.argmax(negative[index], axis=1)  # Bland: the lowest index with a negative reduced cost
        entries = tableau[index, :rows, column]
        positive = entries > _ZERO
        unbounded = ~positive.any(axis=1)
        stopped[index[unbounded]] = True
        active[index[unbounded]] = False
        keep = ~unbounded
        index, column, entries, positive = index[keep], column[keep], entries[keep], positive[keep]
        if not len(index):
            continue
        with np.errstate(divide="ignore", invalid="ignore"):
            ratios = np.where(positive, tableau[index, :rows, -1] / entries, np.inf)
        smallest = ratios.min(axis=1, keepdims=True)
        ties = ratios <= smallest + _ZERO * (1 + np.abs(smallest))
        row = np.argmin(np.where(ties, basis[index], np.iinfo(np.int64).max), axis=1)  # Bland among ties
        pivot_rows = tableau[index, row, :] / tableau[index, row, column][:, None]
        factors = tableau[index, :, column]  # (P, rows + 1)
        tableau[index] -= factors[:, :, None] * pivot_rows[:, None, :]
        tableau[index, row, :] = pivot_rows
        basis[index, row] = column
    return optimal, stopped, active


def _farkas_feasible(matrix, rhs):
    """Whether M z <= r has a solution, for a stack M (B, m, d), r (B, m), d >= 1; None where undecided."""
    count, m, d = matrix.shape
    rows = d + 1
    # columns: y (m), artificials (rows), right-hand side
    tableau = np.zeros((count, rows + 1, m + rows + 1))
    tableau[:, :d, :m] = np.swapaxes(matrix, 1, 2)
    tableau[:, d, :m] = 1.0
    tableau[:, :rows, m:m + rows] = np.eye(rows)
    tableau[:, d, -1] = 1.0
    basis = np.tile(np.arange(m, m + rows), (count, 1))
    # phase 1: minimise the sum of the artificials (reduced costs: minus the column sums of the rows)
    tableau[:, -1, :m] = -tableau[:, :rows, :m].sum(axis=1)
    tableau[:, -1, -1] = -1.0
    result = np.full(count, None, dtype=object)
    _, _, unfinished = _simplex(tableau, basis, np.ones(count, dtype=bool), m + rows)
    # positive artificials: no y >= 0 with M^T y = 0, 1^T y = 1, so no certificate of infeasibility
    no_certificate = ~unfinished & (-tableau[:, -1, -1] > 1e-9)
    result[no_certificate] = True
    going = ~unfinished & ~no_certificate
    # drive the artificials (at zero) out of the basis; a row with no other entry is redundant and
    # stays as it is (its zero entries never take part in a ratio test)
    for row in range(rows):
        stuck = going & (basis[:, row] >= m)
        candidates = np.abs(tableau[:, row, :m]) > 1e-9
        index = np.nonzero(stuck & candidates.any(axis=1))[0]
        if len(index):
            column = np.argmax(candidates[index], axis=1)
            pivot_rows = tableau[index, row, :] / tableau[index, row, column][:, None]
            factors = tableau[index, :, column]
            tableau[index] -= factors[:, :, None] * pivot_rows[:, None, :]
            tableau[index, row, :] = pivot_rows
            basis[index, row] = column
    # phase 2: minimise r^T y (reduced costs c - c_B B^-1 A, the last column -c_B x_B); artificials never enter
    costs = np.concatenate([rhs, np.zeros((count, rows))], axis=1)
    tableau[:, -1, :] = 0.0
    tableau[:, -1, :m] = rhs
    tableau[:, -1, :] -= np.einsum("br,brc->bc", np.take_along_axis(costs, basis, axis=1), tableau[:, :rows, :])
    limit = -TOLERANCE * (1.0 + np.abs(rhs).max(axis=1))
    optimal, stopped, unfinished_2 = _simplex(tableau, basis, going, m, stop_below=limit)
    result[going & stopped] = False
    result[going & optimal] = -tableau[going & optimal, -1, -1] >= limit[going & optimal]
    return result


def _reference(equalities, equality_rhs, inequalities, inequality_rhs):
    """scipy's linprog on one program (for the rare program the simplex above did not finish)."""
    from scipy.optimize import linprog  # here, not at import: half a second that plain solves never use
    n = inequalities.shape[1]
    outcome = linprog(np.zeros(n), A_ub=inequalities if len(inequalities) else None,
                      b_ub=inequality_rhs if len(inequalities) else None,
                      A_eq=equalities if len(equalities) else None, b_eq=equality_rhs if len(equalities) else None,
                      bounds=(None, None), method="highs")
    return outcome.status == 0


def feasible_batch(equalities, equality_rhs, inequalities, inequality_rhs):
    """For each program of a stack, whether some alpha has ``E alpha = e`` and ``G alpha <= g``.

    Parameters
    ----------
    equalities : ndarray of float, shape (B, k, n)
    equality_rhs : ndarray of float, shape (B, k)
    inequalities : ndarray of float, shape (B, m, n)
    inequality_rhs : ndarray of float, shape (B, m)

    Returns
    -------
    ndarray of bool, shape (B,)
        True where the program has a solution (inequalities allowed a slack of :data:`TOLERANCE`
        times the size of their right-hand sides).

    Examples
    --------
    >>> import numpy as np
    >>> rows = np.array([[[-1.0, 0.0]], [[-1.0, 0.0]]])               # x >= 2 and x >= 5 ...
    >>> feasible_batch(np.array([[[1.0, -1.0]]] * 2), np.zeros((2, 1)), rows, np.array([[-2.0], [-5.0]])).tolist()
    [True, True]
    """
    equalities = np.asarray(equalities, dtype=float)
    inequalities = np.asarray(inequalities, dtype=float)
    equality_rhs = np.asarray(equality_rhs, dtype=float)
    inequality_rhs = np.asarray(inequality_rhs, dtype=float)
    count, k, n = equalities.shape
    m = inequalities.shape[1]
    result = np.ones(count, dtype=bool)
    decided = np.zeros(count, dtype=bool)
    if k:
        u, singular, vt = np.linalg.svd(equalities)  # u (B, k, k), vt (B, n, n)
        deficient = singular[:, -1] <= 1e-10 * np.maximum(1.0, singular[:, 0])
        # parallel equalities (parallel edges of a cell): consistent only for special right-hand sides,
        # decided one by one
        for b in np.nonzero(deficient)[0]:
            result[b] = feasible(equalities[b], equality_rhs[b], inequalities[b], inequality_rhs[b])
        decided |= deficient
        safe = np.where(deficient[:, None], 1.0, singular)
        coordinates = np.einsum("bki,bk->bi", u, equality_rhs) / safe
        base = np.einsum("bki,bk->bi", vt[:, :k, :], coordinates)
        null = np.swapaxes(vt[:, k:, :], 1, 2)  # (B, n, n - k)
    else:
        base, null = np.zeros((count, n)), np.tile(np.eye(n), (count, 1, 1))
    if m == 0:
        return result
    matrix = inequalities @ null
    rhs = inequality_rhs - np.einsum("bmn,bn->bm", inequalities, base)
    slack = TOLERANCE * (1 + np.abs(inequality_rhs).max(axis=1))
    todo = ~decided
    d = n - k
    if d == 0:
        result[todo] = np.all(rhs[todo] >= -slack[todo, None], axis=1)
    elif d == 1:
        column = matrix[:, :, 0]
        upper, lower = column > _ZERO, column < -_ZERO
        with np.errstate(divide="ignore", invalid="ignore"):
            high = np.where(upper, rhs / np.where(upper, column, 1.0), np.inf).min(axis=1)
            low = np.where(lower, rhs / np.where(lower, column, 1.0), -np.inf).max(axis=1)
        flat = ~upper & ~lower & (rhs < -slack[:, None])
        result[todo] = ((low <= high + slack) & ~flat.any(axis=1))[todo]
    elif todo.any():
        index = np.nonzero(todo)[0]
        answers = _farkas_feasible(matrix[index], rhs[index])
        for b, answer in zip(index, answers):
            result[b] = answer if answer is not None else \
                _reference(equalities[b], equality_rhs[b], inequalities[b], inequality_rhs[b])
    return result


def feasible(equalities, equality_rhs, inequalities, inequality_rhs):
    """Whether some alpha satisfies ``equalities @ alpha == equality_rhs`` and ``inequalities @ alpha <= inequality_rhs``.

    One program of :func:`feasible_batch`, except that its equalities may be dependent.

    Parameters
    ----------
    equalities : ndarray of float, shape (k, n)
    equality_rhs : ndarray of float, shape (k,)
    inequalities : ndarray of float, shape (m, n)
    inequality_rhs : ndarray of float, shape (m,)

    Returns
    -------
    bool

    Examples
    --------
    >>> import numpy as np
    >>> feasible(np.array([[1.0, -1.0]]), np.array([0.0]), np.array([[-1.0, 0.0]]), np.array([-2.0]))  # x = y >= 2
    True
    """
    equalities = np.asarray(equalities, dtype=float)
    inequalities = np.asarray(inequalities, dtype=float)
    equality_rhs = np.asarray(equality_rhs, dtype=float)
    inequality_rhs = np.asarray(inequality_rhs, dtype=float)
    n = equalities.shape[1] if equalities.ndim == 2 and equalities.shape[1] else inequalities.shape[1]
    equalities = equalities.reshape(-1, n)
    inequalities = inequalities.reshape(-1, n)
    if len(equalities):
        _, singular, vt = np.linalg.svd(equalities)
        rank = int(np.sum(singular > 1e-10 * max(1.0, singular[0])))
        if rank < len(equalities):
            # keep independent rows; the others must be consistent with them
            base, *_ = np.linalg.lstsq(equalities, equality_rhs, rcond=None)
            if np.abs(equalities @ base - equality_rhs).max() > 1e-9 * (1 + np.abs(equality_rhs).max()):
                return False  # E alpha = e has no solution at all
            equalities, equality_rhs = vt[:rank], vt[:rank] @ base
    return bool(feasible_batch(equalities[None], equality_rhs[None], inequalities[None], inequality_rhs[None])[0])
