"""Counting what a real member does: its real solutions (isolated members) or its real branches (curves).

A *real branch* of a real curve X_p is a connected component of its real points (a linkage's assembly
mode). They are counted on a graph: the critical points of a random real linear function l on the real
curve cut its range into intervals; over each interval the real curve is a set of disjoint arcs
(graphs over l), found by solving X_p together with l = w at the interval's middle w. Each arc is
continued along the real segment of slices (a parameter homotopy with gamma = 1 stays real) to the
critical values at both ends of its interval; arcs whose ends meet (at a regular point, where an arc
goes on, or at a fold, where two arcs join) are on one branch. Union-find over the arcs gives the
branches (common practice, no source: the connectivity of a real curve from critical values of a
generic projection, as in cylindrical decompositions). For the members of a family at many samples
(:func:`real_counts`) each of the three steps is one batched run over every sample (sweeps of the
critical-point family and of the slice family, then :func:`~numag.families.sweep.move_points`).

Examples
--------
>>> from numag.system.parse import parse_system
>>> two_circles = parse_system(["((x - 2)^2 + y^2 - 1)*((x + 2)^2 + y^2 - 1)"], ["x", "y"])
>>> real_branches(two_circles, seed=1).branches
2
"""

from dataclasses import dataclass
import enum

import numpy as np

from ..errors import InputError
from ..system.family import Family
from ..system.polynomial import Polynomial, PolynomialSystem, determinant
from ..numeric.cluster import cluster_labels, connected_components, groups
from ..numeric.seeds import random_state
from .sweep import move_points, sweep

__all__ = ["CountKind", "RealCount", "real_branches", "real_counts"]


class CountKind(str, enum.Enum):
    """What the real count of a member is."""

    SOLUTIONS = "real solutions"   #: isolated members: distinct real solutions
    BRANCHES = "real branches"     #: curve members: connected components of the real points
    NOT_COUNTED = "not counted"    #: members of dimension 2 or more: no real count is given


@dataclass(frozen=True)
class RealCount:
    """The real count of one member.

    Attributes
    ----------
    solutions : int or None
        Distinct real isolated solutions (isolated members).
    branches : int or None
        Real branches (curve members).
    failed : int
        Paths that failed on the way (the count may then be low).
    undecided : int
        Solutions that could be told neither real nor paired with their conjugate (decision 0104): the count
        is not sure.
    """

    solutions: object = None
    branches: object = None
    failed: int = 0
    undecided: int = 0

    @property
    def sure(self):
        """Whether nothing failed and every real or complex judgement was made."""
        return not self.failed and not self.undecided

    @property
    def kind(self):
        """SOLUTIONS, BRANCHES, or NOT_COUNTED (members of dimension 2 or more)."""
        if self.solutions is not None:
            return CountKind.SOLUTIONS
        if self.branches is not None:
            return CountKind.BRANCHES
        return CountKind.NOT_COUNTED


def real_counts(family, samples, seed=None):
    """The real count of the members of a real family at real sample values, all samples together.

    Square members: their distinct real solutions (one sweep). Curve members (one equation fewer than
    variables): their real branches, with three batched runs for all samples at once: the critical
    points of l (a sweep of the family F = 0, det [J_x F; l] = 0), the real points over the middle of
    each interval between critical values (a sweep of the family F = 0, l . x = w with w a parameter),
    and every arc moved along the real segment to the critical values at the ends of its interval.
    Members of larger dimension get an empty :class:`RealCount` (kind ``CountKind.NOT_COUNTED``).

    Parameters
    ----------
    family : Family
    samples : array_like, shape (K, m)
        Real parameter values.
    seed : int, optional

    Returns
    -------
    list of RealCount
    """
    samples = np.asarray(samples, dtype=float).reshape(-1, family.n_parameters)
    n, k = family.n_variables, family.system.n_equations
    seed, rng = random_state(seed)
    if len(samples) == 0:
        return []
    if k == n:
        return _solution_counts(family, samples, rng)
    if k != n - 1:
        return [RealCount() for _ in samples]
    return _branch_counts(family, samples, rng)


def _solution_counts(family, samples, rng):
    """Real solutions of square members at the samples, checked by a second sweep where in doubt (decision 0104).

    A path from a generic member's finite solution reaches infinity only where the member lies on the
    discriminant at infinity, and then in every run; a path that jumped onto a point at infinity that every member
    has (two circles share the circular points) does so in one run only, and the lost solution may be real. So a
    sample with paths at infinity, or with a solution neither real nor paired with its conjugate
    (:func:`~numag.families.sweep.judge_real`), is swept once more from another random member. A second count
    that is sure with no path at infinity is taken; one that repeats the first (the same real count and the same
    paths at infinity) confirms it; otherwise the first run's paths at infinity count as failed.
    """
    def counted(result):
        extra = int(result.paths.get("start_failed", 0))
        return [(RealCount(solutions=member.real_count, failed=member.failed + extra, undecided=member.undecided),
                 member.at_infinity) for member in result.values]

    first = counted(sweep(family, samples, seed=int(rng.integers(2 ** 63))))
    counts = [count for count, _ in first]
    doubtful = [r for r, (count, infinite) in enumerate(first) if count.undecided or infinite]
    if not doubtful:
        return counts
    second = counted(sweep(family, samples[doubtful], seed=int(rng.integers(2 ** 63))))
    for r, (again, infinite) in zip(doubtful, second):
        count, before = first[r]
        if again.sure and not infinite:
            counts[r] = again
        elif not (again.sure and count.sure and infinite == before and again.solutions == count.solutions):
            counts[r] = RealCount(solutions=count.solutions, failed=count.failed + before, undecided=count.undecided)
    return counts


def _branch_counts(family, samples, rng):
    """Real branches of curve members at the samples, counted again where in doubt (decision 0107).

    A count is in doubt when a path failed, a point could be told neither real nor paired with its conjugate, or
    an arc end met no other end at its critical value (an arc or a critical point was missed: 3 branches for 1
    was seen). Such a sample is counted once more with fresh random choices (another linear function l, other
    start members): a miss of one run is not repeated in the next, while the branches are the same in every
    run. A second count that is sure is taken; otherwise the first stays, flagged (undecided, exit 3).
    """
    counts = _branches(family, samples, rng)
    doubtful = [r for r, count in enumerate(counts) if not count.sure]
    if doubtful:
        for r, again in zip(doubtful, _branches(family, samples[doubtful], rng)):
            if again.sure:
                counts[r] = again
    return counts


def _branches(family, samples, rng):
    """Real branches of the curve members at the samples (see :func:`real_counts`)."""
    n, m = family.n_variables, family.n_parameters
    total = n + m
    row = rng.standard_normal(n)
    row /= np.linalg.norm(row)
    polynomials = [p.numeric() for p in family.system.polynomials]
    form = Polynomial.linear(np.concatenate([row, np.zeros(m)]).astype(complex))
    gradients = [[p.derivative(j) for j in range(n)] for p in polynomials] + [[form.derivative(j) for j in range(n)]]
    critical_equation = determinant(gradients)
    failed = np.zeros(len(samples), dtype=np.int64)
    undecided = np.zeros(len(samples), dtype=np.int64)
    critical = [np.zeros(0) for _ in samples]
    if not critical_equation.is_zero() and critical_equation.exponents[:, :n].sum(axis=1).max() > 0:
        system = PolynomialSystem(family.system.variables,
                                  polynomials + [critical_equation * (1.0 / critical_equation.coefficient_norm())])
        result = sweep(Family(system, family.parameters), samples, seed=int(rng.integers(2 ** 63)))
        for r, member in enumerate(result.values):
            failed[r] += member.failed + int(result.paths.get("start_failed", 0))
            undecided[r] += member.undecided
            points = member.points[member.real].real if len(member.points) else np.zeros((0, n))
            critical[r] = _distinct(points @ row) if len(points) else np.zeros(0)
    # the slice l . x = w, w one more parameter
    name = "w"
    while name in family.system.variables:
        name += "_"
    lifted = [Polynomial(np.column_stack([p.exponents, np.zeros(len(p.exponents), dtype=np.int64)]),
                         p.numeric_coefficients(), total + 1) for p in polynomials]
    slice_form = Polynomial.linear(np.concatenate([row, np.zeros(m), [-1.0]]).astype(complex))
    slices = Family(PolynomialSystem(list(family.system.variables) + [name], lifted + [slice_form]),
                    tuple(family.parameters) + (name,))
    middles, owners = [], []
    for r, values in enumerate(critical):
        spread = max(1.0, float(np.ptp(values)) if len(values) else 1.0)
        cut = np.concatenate([[values[0] - spread], (values[:-1] + values[1:]) / 2, [values[-1] + spread]]) \
            if len(values) else np.array([0.0])
        middles += [(r, i, w) for i, w in enumerate(cut)]
    over = sweep(slices, [list(samples[r]) + [w] for r, _, w in middles], seed=int(rng.integers(2 ** 63)))
    arcs = []  # (region, interval, point)
    for (r, i, _), member in zip(middles, over.values):
        failed[r] += member.failed + int(over.paths.get("start_failed", 0))
        undecided[r] += member.undecided
        arcs += [(r, i, point.real) for point, real in zip(member.points, member.real) if real]
    starts, targets, points, which = [], [], [], []
    middle_of = {(r, i): w for r, i, w in middles}
    for index, (r, i, point) in enumerate(arcs):
        for side in (i - 1, i):  # the critical values below and above interval i
            if 0 <= side < len(critical[r]):
                starts.append(list(samples[r]) + [middle_of[(r, i)]])
                targets.append(list(samples[r]) + [critical[r][side]])
                points.append(point)
                which.append((index, side))
    ends, lost = move_points(slices, starts, points, targets, real_segment=True, seed=int(rng.integers(2 ** 63))) \
        if starts else (np.zeros((0, n)), 0)
    if lost:  # attributed to the regions of the moved arcs
        for (index, _), end in zip(which, ends):
            if not np.all(np.isfinite(end)):
                failed[arcs[index][0]] += 1
    joined = []  # pairs of arcs of one branch
    meeting = {}
    for (index, side), end in zip(which, ends):
        if np.all(np.isfinite(end)):
            meeting.setdefault((arcs[index][0], side), []).append((index, end.real))
    for (r, _), here in meeting.items():
        found = np.array([end for _, end in here])
        # arc ends meeting at a fold converge only like the square root of the precision
        for members in groups(cluster_labels(found.astype(complex), 1e-5)):
            joined.extend((here[other][0], here[members[0]][0]) for other in members[1:])
            if len(members) == 1:
                # A real curve has no end points: an arc end that meets no other one at its critical value
                # (the arc on the other side, or its partner at a fold) means an arc or a critical point was
                # missed, and the count may be wrong (3 branches for 1 was seen): the region's count is not sure
                failed[r] += 1
    branch_of = connected_components(len(arcs), joined)
    counts = []
    for r in range(len(samples)):
        roots = {int(branch_of[a]) for a, arc in enumerate(arcs) if arc[0] == r}
        counts.append(RealCount(branches=len(roots), failed=int(failed[r]), undecided=int(undecided[r])))
    return counts


def _distinct(values, tolerance=1e-9):
    """Sorted values with those closer than the tolerance (relative) merged."""
    values = np.sort(np.asarray(values, dtype=float))
    kept = []
    for value in values:
        if not kept or abs(value - kept[-1]) > tolerance * (1 + abs(value)):
            kept.append(value)
    return np.array(kept)


def real_branches(system, seed=None):
    """The number of real branches of a real curve X = V(F) (n - 1 equations in n unknowns).

    Returns
    -------
    RealCount
        With ``branches`` set; ``failed`` counts paths that failed (the count is then a guess).

    Raises
    ------
    InputError
        For a system that is not n - 1 equations in n unknowns.
    """
    if system.n_equations != system.n_variables - 1 or system.projective:
        raise InputError("real branches are counted for affine curves: n - 1 equations in n unknowns")
    # a curve is a family of one member: a dummy parameter that appears in no equation
    name = "t"
    while name in system.variables:
        name += "_"
    lifted = [Polynomial(np.column_stack([p.exponents, np.zeros(len(p.exponents), dtype=np.int64)]),
                         p.numeric_coefficients(), system.n_variables + 1) for p in system.polynomials]
    family = Family(PolynomialSystem(list(system.variables) + [name], lifted), (name,))
    return real_counts(family, [[0.0]], seed=seed)[0]
