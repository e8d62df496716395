"""Counting what a real member does: its real solutions (isolated members) or its real branches (curves).

A *real branch* of a real curve X_p is a connected component of its real points (a linkage's assembly
mode). They are counted on a graph: the critical points of a random real linear function l on the real
curve cut its range into intervals; over each interval the real curve is a set of disjoint arcs
(graphs over l), found by solving X_p together with l = w at the interval's middle w. Each arc is
continued along the real segment of slices (a parameter homotopy with gamma = 1 stays real) to the
critical values at both ends of its interval; arcs whose ends meet (at a regular point, where an arc
goes on, or at a fold, where two arcs join) are on one branch. Union-find over the arcs gives the
branches (common practice, no source: the connectivity of a real curve from critical values of a
generic projection, as in cylindrical decompositions).

Examples
--------
>>> from numag.system.parse import parse_system
>>> two_circles = parse_system(["((x - 2)^2 + y^2 - 1)*((x + 2)^2 + y^2 - 1)"], ["x", "y"])
>>> real_branches(two_circles, seed=1).branches
2
"""

from dataclasses import dataclass
import math

import numpy as np

from ..errors import InputError
from ..system.polynomial import Polynomial, PolynomialSystem, determinant
from ..numeric.cluster import cluster_labels, groups
from ..numeric.seeds import random_state
from ..tracking.homotopy import ParameterHomotopy
from ..tracking.service import track
from ..tracking.solve import SolveOptions, solve_system
from ..tracking.tracker import PathStatus

__all__ = ["RealCount", "real_solutions", "real_branches"]

#: Relative imaginary part under which a point counts as real.
REAL_TOLERANCE = 1e-8


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
    """

    solutions: object = None
    branches: object = None
    failed: int = 0


def _real(points):
    return np.all(np.abs(points.imag) <= REAL_TOLERANCE * (1 + np.abs(points)), axis=1)


def real_solutions(system, seed=None):
    """The distinct real isolated solutions of a real square system (a :class:`RealCount`)."""
    result = solve_system(system, seed=seed)
    points = np.array([s.point for s in result.solutions]).reshape(-1, system.n_variables)
    failed = int(np.sum(result.status >= PathStatus.FAILED_MIN_STEP))
    return RealCount(solutions=int(np.sum(_real(points))) if len(points) else 0, failed=failed)


def _with_slice(system, row, value):
    """The system with the linear equation row . x = value appended."""
    form = Polynomial.linear(np.asarray(row, dtype=complex), -complex(value))
    return PolynomialSystem(system.variables, [p.numeric() for p in system.polynomials] + [form], name=system.name)


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
    n = system.n_variables
    if system.n_equations != n - 1 or system.projective:
        raise InputError("real branches are counted for affine curves: n - 1 equations in n unknowns")
    seed, rng = random_state(seed)
    row = rng.standard_normal(n)
    row /= np.linalg.norm(row)
    form = Polynomial.linear(row.astype(complex))
    # critical points of l on X: F = 0 and det [J_F; l] = 0
    gradients = [[p.numeric().derivative(j) for j in range(n)] for p in system.polynomials]
    gradients.append([form.derivative(j) for j in range(n)])
    critical_equation = determinant(gradients)
    failed = 0
    critical_values = np.zeros(0)
    if not critical_equation.is_zero() and critical_equation.degree > 0:
        critical = PolynomialSystem(system.variables, [p.numeric() for p in system.polynomials]
                                    + [critical_equation * (1.0 / critical_equation.coefficient_norm())])
        result = solve_system(critical, seed=int(rng.integers(2 ** 63)))
        failed += int(np.sum(result.status >= PathStatus.FAILED_MIN_STEP))
        points = np.array([s.point for s in result.solutions]).reshape(-1, n)
        points = points[_real(points)].real if len(points) else points.real
        critical_values = np.unique(np.round(points @ row, 12)) if len(points) else critical_values
    # interval middles (and one beyond each end, where unbounded branches run)
    spread = max(1.0, float(np.ptp(critical_values)) if len(critical_values) else 1.0)
    if len(critical_values):
        middles = np.concatenate([[critical_values[0] - spread], (critical_values[:-1] + critical_values[1:]) / 2,
                                  [critical_values[-1] + spread]])
    else:
        middles = np.array([0.0])
    arcs = []  # (interval, point at the middle)
    for interval, middle in enumerate(middles):
        result = solve_system(_with_slice(system, row, middle), seed=int(rng.integers(2 ** 63)))
        failed += int(np.sum(result.status >= PathStatus.FAILED_MIN_STEP))
        for solution in result.solutions:
            if solution.real:
                arcs.append((interval, solution.point.real))
    if not arcs:
        return RealCount(branches=0, failed=failed)
    # continue every arc to the critical values at both ends of its interval
    ends = []  # (arc, critical value index, end point)
    for side in (0, 1):
        for interval in range(len(middles)):
            members = [k for k, (i, _) in enumerate(arcs) if i == interval]
            target_index = interval - 1 + side  # the critical value on that side
            if not members or not 0 <= target_index < len(critical_values):
                continue
            start = _with_slice(system, row, middles[interval])
            target = _with_slice(system, row, critical_values[target_index])
            points = np.array([arcs[k][1] for k in members])
            moved, lost = _real_continuation(start, target, points, rng)
            failed += lost
            for k, point in zip(members, moved):
                if np.all(np.isfinite(point)):
                    ends.append((k, target_index, point))
    parent = list(range(len(arcs)))

    def find(k):
        while parent[k] != k:
            parent[k] = parent[parent[k]]
            k = parent[k]
        return k

    for index in range(len(critical_values)):
        here = [(k, point) for k, i, point in ends if i == index]
        if len(here) < 2:
            continue
        points = np.array([point for _, point in here])
        # arc ends meeting at a fold converge only like the square root of the precision
        for members in groups(cluster_labels(points.astype(complex), 1e-5)):
            for other in members[1:]:
                parent[find(here[other][0])] = find(here[members[0]][0])
    return RealCount(branches=len({find(k) for k in range(len(arcs))}), failed=failed)


def _real_continuation(start, target, points, rng):
    """Move real points along the real segment of slices (gamma = 1): the endpoints and the failures."""
    homotopy = ParameterHomotopy.from_systems(start, target, rng)
    homotopy.gamma = 1.0  # tau(s) = s: the path stays on the real segment between the two slices
    starts = homotopy.start_solutions_from(points)
    run = track(homotopy, starts)
    ends = run.affine_endpoints()
    lost = int(np.sum(run.status >= PathStatus.FAILED_MIN_STEP))
    return ends.real, lost
