"""Precision rescue: re-track one path in arbitrary precision (mpmath).

Paths that fail in double precision even with the cautious step control
usually fail because two paths come very close somewhere in the middle
(s in (0.1, 1)), where double precision cannot tell them apart. This module
tracks such a path from s = 1 to the endgame radius at a chosen number of
digits; the batched tracker then finishes it (the endgame works in double
precision on the well-separated end of the path).

The predictor is the batched stepper's :class:`~numag.tracking.methods.ButcherTableau` (``RK4``)
and the step rule a named policy (:class:`~numag.tracking.methods.HalvingStepRule`), both written
against a precision context: the homotopy's ``evaluate_precise(point, s, ctx)`` and the context's
``matrix``, ``lu_solve`` and ``norm``, as mpmath's own contexts share them.
"""

import numpy as np

from .methods import RESCUE_STEP_RULE, RK4, decimal

__all__ = ["track_segment_precise"]


def _corrected(homotopy, predicted, s, tolerance, rule, ctx):
    """Newton corrections at s: the point and the last correction's relative size, or (None, None) when
    the corrections do not contract or the Jacobian is singular."""
    previous = None
    for _ in range(rule.corrector_iterations):
        values, jacobian, _ = homotopy.evaluate_precise(list(predicted), s, ctx)
        try:
            delta = ctx.lu_solve(jacobian, values)
        except ZeroDivisionError:
            return None, None
        predicted = predicted - delta
        size = ctx.norm(delta) / (1 + ctx.norm(predicted))
        if previous is not None and size > rule.contraction * previous and size > tolerance:
            return None, None
        previous = size
    return predicted, previous


def track_segment_precise(homotopy, start, s_start, s_end, digits, max_steps=20000, *, method=RK4,
                          rule=RESCUE_STEP_RULE, ctx=None):
    """Track one path along real s from ``s_start`` down to ``s_end`` at ``digits`` digits.

    Parameters
    ----------
    homotopy : object with ``evaluate_precise(point, s, ctx)``
    start : sequence of complex
    s_start, s_end : float
        ``s_end < s_start``.
    digits : int
    max_steps : int
    method : ButcherTableau
        The predictor (the batched stepper's).
    rule : HalvingStepRule
        The step control.
    ctx : mpmath context, optional
        Its ``workdps`` sets the precision (default ``mpmath.mp``).

    Returns
    -------
    (ndarray or None, int)
        The point at ``s_end`` (complex double) or None when the path failed, and the steps taken.

    Examples
    --------
    >>> import numpy as np
    >>> from numag.system.parse import parse_system
    >>> from numag.tracking.homotopy import StraightLineHomotopy
    >>> homotopy = StraightLineHomotopy.total_degree(parse_system(["x^2 - 4"], ["x"]), np.random.default_rng(0))
    >>> near, steps = track_segment_precise(homotopy, homotopy.start_solutions()[0], 1.0, 0.1, 30)
    >>> near.shape, steps > 0
    ((2,), True)
    """
    if ctx is None:
        import mpmath  # here, not at import: a double-precision solve never needs it
        ctx = mpmath.mp
    with ctx.workdps(digits):
        point = ctx.matrix([ctx.mpc(v) for v in start])
        s = ctx.mpf(s_start)
        target = ctx.mpf(s_end)
        step = decimal(ctx, rule.initial_step)
        tolerance = rule.tolerance(ctx, digits)
        minimum = rule.min_step(ctx, digits)
        successes = steps = 0
        while s > target and steps < max_steps:
            steps += 1
            h = -min(step, s - target)  # s decreases: the stepper's signed step
            try:
                stages = [-ctx.lu_solve(*homotopy.evaluate_precise(list(point), s, ctx)[1:])]
                for i in range(1, len(method.nodes)):
                    _, jacobian, derivative = homotopy.evaluate_precise(
                        list(method.stage_point(i, point, h, stages)), method.stage_time(i, s, h), ctx)
                    stages.append(-ctx.lu_solve(jacobian, derivative))
            except ZeroDivisionError:
                return None, steps
            new_s = s + h
            corrected, last = _corrected(homotopy, method.advance(point, h, stages), new_s, tolerance, rule, ctx)
            if corrected is not None and last <= tolerance * rule.acceptance_slack:
                point, s = corrected, new_s
                step, successes = rule.after_accepted(step, successes, ctx)
            else:
                step, successes = rule.after_rejected(step)
                if step < minimum:
                    return None, steps
        if s > target:
            return None, steps
        return np.array([complex(v) for v in point]), steps
