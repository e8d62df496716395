"""Precision rescue: re-track one path in arbitrary precision (mpmath).

Paths that fail in double precision even with the cautious step control
usually fail because two paths come very close somewhere in the middle
(s in (0.1, 1)), where double precision cannot tell them apart. This module
tracks such a path from s = 1 to the endgame radius at a chosen number of
digits; the batched tracker then finishes it (the endgame works in double
precision on the well-separated end of the path).

Written against the homotopy's ``evaluate_precise(point, s, ctx)``.
"""

import mpmath
import numpy as np

__all__ = ["track_segment_precise"]


def _velocity(homotopy, point, s, ctx):
    _, jacobian, derivative = homotopy.evaluate_precise(point, s, ctx)
    step = ctx.lu_solve(jacobian, derivative)
    return [-step[k] for k in range(len(point))]


def _combine(point, direction, factor):
    return [p + factor * d for p, d in zip(point, direction)]


def track_segment_precise(homotopy, start, s_start, s_end, digits, max_steps=20000):
    """Track one path along real s from ``s_start`` to ``s_end`` at ``digits`` digits.

    Parameters
    ----------
    homotopy : object with ``evaluate_precise``
    start : sequence of complex
    s_start, s_end : float
    digits : int
    max_steps : int

    Returns
    -------
    (ndarray or None, int)
        The point at ``s_end`` (complex double) or None when the path failed, and the steps taken.
    """
    with mpmath.mp.workdps(digits):
        ctx = mpmath.mp
        point = [ctx.mpc(v) for v in start]
        s = ctx.mpf(s_start)
        target = ctx.mpf(s_end)
        step = ctx.mpf("0.01")
        tolerance = ctx.mpf(10) ** (-(digits * 2) // 3)
        minimum = ctx.mpf(10) ** (-(digits - 5))
        successes = steps = 0
        while s > target and steps < max_steps:
            steps += 1
            h = min(step, s - target)
            try:
                k1 = _velocity(homotopy, point, s, ctx)
                k2 = _velocity(homotopy, _combine(point, k1, -h / 2), s - h / 2, ctx)
                k3 = _velocity(homotopy, _combine(point, k2, -h / 2), s - h / 2, ctx)
                k4 = _velocity(homotopy, _combine(point, k3, -h), s - h, ctx)
            except ZeroDivisionError:
                return None, steps
            predicted = [p - h / 6 * (a + 2 * b + 2 * c + d) for p, a, b, c, d in zip(point, k1, k2, k3, k4)]
            new_s = s - h
            ok, previous = True, None
            for _ in range(3):
                values, jacobian, _ = homotopy.evaluate_precise(predicted, new_s, ctx)
                try:
                    delta = ctx.lu_solve(jacobian, values)
                except ZeroDivisionError:
                    ok = False
                    break
                predicted = [p - delta[k] for k, p in enumerate(predicted)]
                size = ctx.norm(delta) / (1 + ctx.norm(ctx.matrix(predicted)))
                if previous is not None and size > previous / 2 and size > tolerance:
                    ok = False
                    break
                previous = size
            if ok and previous <= tolerance * 1000:
                point, s = predicted, new_s
                successes += 1
                if successes >= 3:
                    step, successes = min(step * 2, ctx.mpf("0.1")), 0
            else:
                step /= 2
                successes = 0
                if step < minimum:
                    return None, steps
        if s > target:
            return None, steps
        return np.array([complex(v) for v in point]), steps
