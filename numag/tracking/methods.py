"""The predictor's method table and the step-control constants, shared by every tracker.

A :class:`ButcherTableau` describes an explicit Runge-Kutta method. Its arithmetic
(:meth:`ButcherTableau.stage_point`, :meth:`ButcherTableau.stage_time`,
:meth:`ButcherTableau.advance`) is written once against array arithmetic, so the same lines serve the
batched double-precision :class:`~numag.tracking.tracker.Stepper` (numpy arrays, one step size per
row) and the precision rescue (:mod:`numag.tracking.rescue`: one path as a column matrix of an
mpmath context, the way mpmath's ``mp``, ``fp`` and ``iv`` contexts share one interface). This module
sits apart from ``tracker`` because ``tracker`` imports ``rescue``: both import from here.

Examples
--------
>>> import numpy as np
>>> x, h = np.array([[1.0]]), np.array([[0.1]])
>>> stages = [-x]                                   # dx/dt = -x: the slope at x
>>> for i in range(1, len(RK4.nodes)):
...     stages.append(-RK4.stage_point(i, x, h, stages))
>>> step = float(RK4.advance(x, h, stages)[0, 0])   # exp(-0.1), to RK4's error h^5 / 120 (common practice)
>>> round(step, 6), round(float(np.exp(-0.1)), 6)
(0.904837, 0.904837)
"""

from dataclasses import dataclass

from ..errors import is_integer, is_number, require_option

__all__ = ["ButcherTableau", "RK4", "STEP_SAFETY", "STEP_MIN_FACTOR", "STEP_MAX_FACTOR", "STEP_REJECT_FACTOR",
           "ERROR_FLOOR", "HalvingStepRule", "RESCUE_STEP_RULE", "decimal"]


@dataclass(frozen=True)
class ButcherTableau:
    """An explicit Runge-Kutta method: stage i is k_i = f(x + h sum_j a_ij k_j, t + c_i h) and the
    step x + h sum_i b_i k_i, with b_i = ``weights[i] / denominator``.

    Attributes
    ----------
    nodes : tuple of float
        c_i.
    coupling : tuple of tuple
        Row i lists the nonzero (j, a_ij) of the stage's input (a zero term could turn a NaN in an
        unused stage into a NaN point).
    weights : tuple of float
        b_i times ``denominator``.
    denominator : float
    agreeing : tuple of int
        Two stages that estimate the same slope; where they disagree the step is rejected before
        the later stages are paid for (empty: no such check).

    Examples
    --------
    >>> RK4.order, [w / RK4.denominator for w in RK4.weights]
    (4, [0.16666666666666666, 0.3333333333333333, 0.3333333333333333, 0.16666666666666666])
    """

    nodes: tuple
    coupling: tuple
    weights: tuple
    denominator: float
    order: int
    agreeing: tuple = ()

    def stage_point(self, i, x, h, stages):
        """The input of stage ``i``: x + h sum_j a_ij k_j.

        ``h`` broadcasts against ``x``: a column (P, 1) beside a batch of points (P, N), or a scalar of a
        precision context beside one point (a context's column matrix).
        """
        point = x
        for j, a in self.coupling[i]:
            point = point + a * h * stages[j]
        return point

    def stage_time(self, i, t, h):
        """The time of stage ``i``: t + c_i h (t + h exactly for the last node of RK4)."""
        node = self.nodes[i]
        return t + (h if node == 1.0 else node * h)

    def advance(self, x, h, stages):
        """The step x + h sum_i b_i k_i (``h`` broadcasts as in :meth:`stage_point`); weights of 1 cost no product."""
        total = self.weights[0] * stages[0] if self.weights[0] != 1.0 else stages[0]
        for weight, k in zip(self.weights[1:], stages[1:]):
            total = total + (k if weight == 1.0 else weight * k)
        return x + (h / self.denominator) * total


#: The classical fourth-order Runge-Kutta method (its two midpoint stages estimate the same slope).
RK4 = ButcherTableau(nodes=(0.0, 0.5, 0.5, 1.0), coupling=((), ((0, 0.5),), ((1, 0.5),), ((2, 1.0),)),
                     weights=(1.0, 2.0, 2.0, 1.0), denominator=6.0, order=4, agreeing=(1, 2))

#: Step control. The first Newton correction measures the predictor's error, which scales like
#: h^(order + 1); the next step aims at ``predictor_error`` with this safety factor ...
STEP_SAFETY = 0.8
#: ... and changes by at most these factors after an accepted step ...
STEP_MIN_FACTOR, STEP_MAX_FACTOR = 0.5, 2.0
#: ... and by this factor after a rejected one.
STEP_REJECT_FACTOR = 0.5
#: Errors are floored here before dividing by them.
ERROR_FLOOR = 1e-300


@dataclass(frozen=True)
class HalvingStepRule:
    """The precision rescue's step control: grow by ``STEP_MAX_FACTOR`` after ``successes_to_grow``
    accepted steps in a row, shrink by ``STEP_REJECT_FACTOR`` after a rejected one.

    It stays apart from the batched stepper's error-based control (decision 0036): the rescue runs on
    the few paths that failed twice in double precision, where a cautious, predictable rule is
    what saves them, and changing it changes which paths are rescued.

    Attributes
    ----------
    initial_step, max_step : float
        Step sizes in s.
    successes_to_grow : int
        Accepted steps in a row before the step grows.
    corrector_iterations : int
        Newton corrections per step.
    contraction : float
        Each correction after the first must be below this fraction of the previous one (or below the
        tolerance), like the later corrections of the batched corrector.
    acceptance_slack : float
        A step is accepted when its last correction is within this multiple of the tolerance.
    tolerance_fraction : float
        The tolerance is 10^-(this fraction of the digits) ...
    guard_digits : int
        ... and the smallest step 10^-(digits - guard_digits).

    Examples
    --------
    >>> import mpmath
    >>> RESCUE_STEP_RULE.tolerance(mpmath.mp, 30), RESCUE_STEP_RULE.min_step(mpmath.mp, 30)
    (mpf('1.0e-20'), mpf('1.0e-25'))
    """

    initial_step: float = 0.01
    max_step: float = 0.1
    successes_to_grow: int = 3
    corrector_iterations: int = 3
    contraction: float = 0.5
    acceptance_slack: float = 1000.0
    tolerance_fraction: tuple = (2, 3)
    guard_digits: int = 5

    def __post_init__(self):
        """Refuse a bad value on construction, naming the option."""
        for name in ("initial_step", "max_step", "acceptance_slack"):
            require_option(is_number(getattr(self, name)) and getattr(self, name) > 0, name, "positive",
                           getattr(self, name))
        for name in ("successes_to_grow", "corrector_iterations"):
            require_option(is_integer(getattr(self, name)) and getattr(self, name) >= 1, name, "a positive integer",
                           getattr(self, name))
        require_option(is_number(self.contraction) and 0 < self.contraction < 1, "contraction", "in (0, 1)",
                       self.contraction)

    def tolerance(self, ctx, digits):
        """Relative size of the last correction for a converged corrector, at ``digits`` digits."""
        numerator, denominator = self.tolerance_fraction
        return ctx.mpf(10) ** (-(digits * numerator) // denominator)

    def min_step(self, ctx, digits):
        """The step below which the path fails, at ``digits`` digits."""
        return ctx.mpf(10) ** (-(digits - self.guard_digits))

    def after_accepted(self, step, successes, ctx):
        """The next step and the count of accepted steps in a row after an accepted step."""
        successes += 1
        if successes >= self.successes_to_grow:
            return min(step * STEP_MAX_FACTOR, decimal(ctx, self.max_step)), 0
        return step, successes

    def after_rejected(self, step):
        """The next step after a rejected one (the count of accepted steps in a row starts again)."""
        return step * STEP_REJECT_FACTOR, 0


def decimal(ctx, value):
    """``value`` as the context's number with the decimal digits it is written with (0.1 is one tenth at
    any precision, not the double nearest to it).

    Examples
    --------
    >>> import mpmath
    >>> with mpmath.mp.workdps(30):
    ...     print(decimal(mpmath.mp, 0.1))
    0.1
    """
    return ctx.mpf(repr(float(value)))


#: The rule the rescue uses.
RESCUE_STEP_RULE = HalvingStepRule()
