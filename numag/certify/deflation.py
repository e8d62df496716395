"""Isosingular deflation: when Newton or Krawczyk fails on the square subsystem at a near zero, minors
of size rank + 1 of the Jacobian are added (never an equation removed) until the zero is regular
(Hauenstein & Wampler, "Isosingular sets and deflation", Found. Comput. Math. 2013), within size
limits; ``_locate`` returns the proved box with the rows and the number of deflations.
"""

import numpy as np

from ..errors import LimitError
from ..system.polynomial import Limits
from .equations import _is_real, _minor_equations
from .records import _guarded, working_digits
from .square import (_DEFLATION_THRESHOLD, _Square, _Undecided, _absolute_jacobian, _choose_rows,
                     _gauss_newton_double, _near_zero, _proved_box)


#: Deflation minors are expanded polynomials: beyond these sizes deflation stops (undecided) rather than
#: spending minutes on a point that lies on a positive-dimensional solution set.
_DEFLATION_LIMITS = Limits(max_terms=20_000, max_term_products=200_000)


#: Deflation is not tried when the equations have more terms (times unknowns) than this.
_DEFLATION_TERMS = 4000


def _locate(required, pinned, point, options, digits, squares, reach, absolute):
    """Newton and Krawczyk on a square subsystem, deflating after each failure at a near zero.

    Returns (found, problem, digits that might help, deflations); found is (box, rows, deflations, square,
    chosen) or None. The deflation minors have size r + 1 with r the numerical rank of J (at most n - 1),
    in units of the point's coordinates, or with ``absolute`` the smaller of that and the absolute rank.
    """
    n = len(point)
    rng = np.random.default_rng(options.seed)
    equations = list(required)
    x = _gauss_newton_double(equations + list(pinned), point)
    w = _guarded(digits)
    problem, wanted, deflations = "", None, 0
    for deflations in range(options.max_deflations + 1):
        try:
            rows, rank = _choose_rows(equations, list(pinned), x)
        except _Undecided as err:
            return None, str(err), None, deflations
        chosen = list(pinned) + [equations[k] for k in rows]
        key = tuple(id(p) for p in chosen)
        if squares is not None and key in squares:
            square = squares[key]
        else:
            square = _Square(chosen)
            if squares is not None and not deflations:
                squares[key] = square
        with working_digits(w):
            center, converged = square.newton(x, digits)
            center = [center[j] for j in range(n)]
            moved = float(max((abs(complex(center[j]) - point[j]) for j in range(n)), default=0.0))
            if not converged:  # a multiple zero, or a cluster that more digits may separate
                problem, wanted = "Newton's method on the square subsystem did not converge", 2 * digits
            elif moved > reach:
                problem, wanted = (f"the zero of the square subsystem near the point lies {moved:.3g} away "
                                   f"(more than {reach:.3g})"), None
            else:
                box = _proved_box(square, center, digits, _is_real(chosen))
                if box is not None:
                    return (box, rows, deflations, square, chosen), "", None, deflations
                problem, wanted = (f"neither Krawczyk's test nor the alpha test succeeded at {digits} digits "
                                   "(ill-conditioned)"), 2 * digits
                if digits < options.limit:
                    # Newton converged, Krawczyk could not enclose: a regular zero too ill-conditioned for these
                    # digits (roots 1e-8 apart at 30 digits) looks just like a multiple one; deflation would
                    # certify the multiple zero of a nearby system instead, so more digits come first and
                    # deflation only at the last precision allowed
                    break
        if deflations == options.max_deflations or not _near_zero(equations, x):
            break
        if float(np.max(np.abs(x - point))) > reach:
            problem += (f" (the equations' nearest near zero, {float(np.max(np.abs(x - point))):.3g} away, is out "
                        "of reach)")
            break
        if sum(p.n_terms for p in equations) * n > _DEFLATION_TERMS:
            problem += "; the deflation minors would be too large to write out"
            break
        if absolute:
            rank = min(rank, int(np.sum(np.linalg.svd(_absolute_jacobian(equations, x), compute_uv=False)
                                        > _DEFLATION_THRESHOLD)))
        # Newton or Krawczyk failed at a near zero: deflate, by the n x n minors at least
        try:
            minors, _ = _minor_equations(equations, min(rank, n - 1) + 1, n, options.max_minors, rng,
                                         _DEFLATION_LIMITS)
        except LimitError as err:
            problem += f"; deflation stopped: {err}"
            break
        if not minors:
            break
        equations = equations + minors
        x = _gauss_newton_double(equations + list(pinned), x)
    return None, problem, wanted, deflations
