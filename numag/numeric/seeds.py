"""Seeds: one place that turns the ``seed`` argument of every entry point into a recorded seed and a
random generator.

Every random choice of numag (start systems, gamma, slices, combinations of equations) comes from a
``numpy.random.Generator`` made from an integer seed that the result records, so that any run can be
repeated. ``seed=None`` draws a fresh seed from the operating system's entropy.

Examples
--------
>>> seed, rng = random_state(7)
>>> seed, float(rng.random()) == float(random_state(7)[1].random())
(7, True)
>>> 0 <= resolved_seed(None) < 2 ** 32
True
"""

import numpy as np

__all__ = ["resolved_seed", "random_state"]


def resolved_seed(seed):
    """``seed`` itself, or a fresh seed from 0 to 2^32 - 1 when it is None (recorded in results).

    Examples
    --------
    >>> resolved_seed(3)
    3
    """
    if seed is None:
        return int(np.random.SeedSequence().entropy % (2**32))
    return seed


def random_state(seed):
    """The resolved seed and the generator made from it: ``(seed, numpy.random.Generator)``.

    Examples
    --------
    >>> seed, rng = random_state(0)
    >>> seed, int(rng.integers(10)) == int(np.random.default_rng(0).integers(10))
    (0, True)
    """
    seed = resolved_seed(seed)
    return seed, np.random.default_rng(seed)
