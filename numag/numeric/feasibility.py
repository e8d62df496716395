"""Feasibility of small systems of linear equations and inequalities, by a dense simplex of our own.

The mixed-cell search of the polyhedral start asks tens of thousands of times whether some
alpha in R^n (n up to about 10) satisfies E alpha = e and G alpha <= g with a few dozen rows.
A general solver spends most of its time setting up (scipy's ``linprog`` with HiGHS: about 2 to
3 ms a call, decision 0055); these programs are small enough for a dense tableau in numpy.

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

__all__ = ["feasible", "TOLERANCE"]

#: Slack allowed on the inequalities, relative to the size of their right-hand sides.
TOLERANCE = 1e-9


def _pivot(tableau, row, column):
    """One Gauss-Jordan pivot of the tableau in place."""
    tableau[row] /= tableau[row, column]
    factors = tableau[:, column].copy()
    factors[row] = 0.0
    tableau -= factors[:, None] * tableau[row][None, :]


def _simplex(tableau, basis, columns, stop_below=None):
    """Minimise the last row's objective over the tableau's columns ``columns`` (Bland's rule), in place.

    The tableau holds the constraint rows and, last, the reduced costs with minus the objective value
    in its last column. Returns False when the objective is unbounded below, or when ``stop_below``
    is given and the objective falls below it (the caller's certificate); True at an optimum.
    """
    rows = tableau.shape[0] - 1
    while True:
        if stop_below is not None and -tableau[-1, -1] < stop_below:
            return False
        costs = tableau[-1, columns]
        entering = np.nonzero(costs < -1e-12)[0]
        if not len(entering):
            return True
        column = columns[entering[0]]  # Bland: the lowest index with a negative reduced cost
        entries = tableau[:rows, column]
        candidates = np.nonzero(entries > 1e-12)[0]
        if not len(candidates):
            return False
        ratios = tableau[candidates, -1] / entries[candidates]
        smallest = ratios.min()
        ties = candidates[ratios <= smallest + 1e-12 * (1 + abs(smallest))]
        row = ties[np.argmin(basis[ties])]  # Bland: the lowest basic index among the ties
        _pivot(tableau, row, column)
        basis[row] = column


def _farkas_feasible(matrix, rhs):
    """Whether M z <= r has a solution z (M of shape (m, d), d >= 1), by the linear program above."""
    m, d = matrix.shape
    rows = d + 1
    # columns: y (m), artificials (rows), right-hand side
    tableau = np.zeros((rows + 1, m + rows + 1))
    tableau[:d, :m] = matrix.T
    tableau[d, :m] = 1.0
    tableau[:rows, m:m + rows] = np.eye(rows)
    tableau[d, -1] = 1.0
    basis = np.arange(m, m + rows)
    # phase 1: minimise the sum of the artificials (reduced costs: minus the column sums of the rows)
    tableau[-1, :m] = -tableau[:rows, :m].sum(axis=0)
    tableau[-1, -1] = -1.0
    if not _simplex(tableau, basis, np.arange(m + rows)):
        return True  # cannot happen (phase 1 is bounded below by 0); kept as the safe answer
    if -tableau[-1, -1] > 1e-9:
        return True  # no y >= 0 with M^T y = 0, 1^T y = 1: no certificate of infeasibility
    # drive artificials out of the basis (they sit at zero); a row with no other entry is redundant
    keep = np.ones(rows, dtype=bool)
    for row in range(rows):
        if basis[row] >= m:
            nonzero = np.nonzero(np.abs(tableau[row, :m]) > 1e-9)[0]
            if len(nonzero):
                _pivot(tableau, row, nonzero[0])
                basis[row] = nonzero[0]
            else:
                keep[row] = False
    tableau = np.vstack([tableau[:rows][keep][:, list(range(m)) + [m + rows]], np.zeros((1, m + 1))])
    basis = basis[keep]
    # phase 2: minimise r^T y; reduced costs c - c_B B^-1 A, objective row holds -c_B x_B
    tableau[-1, :m] = rhs
    tableau[-1] -= rhs[basis] @ tableau[:-1]
    scale = 1.0 + np.abs(rhs).max()
    return _simplex(tableau, basis, np.arange(m), stop_below=-TOLERANCE * scale) and \
        -tableau[-1, -1] >= -TOLERANCE * scale


def feasible(equalities, equality_rhs, inequalities, inequality_rhs):
    """Whether some alpha satisfies ``equalities @ alpha == equality_rhs`` and ``inequalities @ alpha <= inequality_rhs``.

    Parameters
    ----------
    equalities : ndarray of float, shape (k, n)
    equality_rhs : ndarray of float, shape (k,)
    inequalities : ndarray of float, shape (m, n)
    inequality_rhs : ndarray of float, shape (m,)

    Returns
    -------
    bool
        True when the system has a solution (inequalities allowed a slack of :data:`TOLERANCE`
        times the size of their right-hand sides).

    Examples
    --------
    >>> import numpy as np
    >>> feasible(np.array([[1.0, -1.0]]), np.array([0.0]), np.array([[-1.0, 0.0]]), np.array([-2.0]))  # x = y >= 2
    True
    """
    equalities = np.asarray(equalities, dtype=float)
    inequalities = np.asarray(inequalities, dtype=float)
    n = inequalities.shape[1] if inequalities.size else equalities.shape[1]
    equality_rhs = np.asarray(equality_rhs, dtype=float)
    inequality_rhs = np.asarray(inequality_rhs, dtype=float)
    if len(equalities):
        u, singular, vt = np.linalg.svd(equalities)
        rank = int(np.sum(singular > 1e-10 * max(1.0, singular[0])))
        coordinates = (u[:, :rank].T @ equality_rhs) / singular[:rank]
        base = vt[:rank].T @ coordinates
        if np.abs(equalities @ base - equality_rhs).max() > 1e-9 * (1 + np.abs(equality_rhs).max()):
            return False  # E alpha = e has no solution at all
        null = vt[rank:].T
    else:
        base, null = np.zeros(n), np.eye(n)
    if not len(inequalities):
        return True
    matrix = inequalities @ null
    rhs = inequality_rhs - inequalities @ base
    slack = TOLERANCE * (1 + np.abs(inequality_rhs).max())
    if null.shape[1] == 0:
        return bool(np.all(rhs >= -slack))
    if null.shape[1] == 1:
        column = matrix[:, 0]
        upper, lower = column > 1e-12, column < -1e-12
        if np.any(rhs[~upper & ~lower] < -slack):
            return False
        high = np.min(rhs[upper] / column[upper]) if upper.any() else np.inf
        low = np.max(rhs[lower] / column[lower]) if lower.any() else -np.inf
        return bool(low <= high + slack)
    return bool(_farkas_feasible(matrix, rhs))
