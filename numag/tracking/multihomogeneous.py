"""Multihomogeneous start systems: variable groups, their Bezout count, products of linear forms.

The unknowns are split into groups Z_1, ..., Z_m of sizes k_1, ..., k_m, and equation i has
degree d_ij in the variables of group j. The number of isolated solutions of such a system is
at most the multihomogeneous Bezout number, the coefficient of z_1^k_1 ... z_m^k_m in
prod_i (d_i1 z_1 + ... + d_im z_m) (Morgan and Sommese 1987, "A homotopy for solving general
polynomial systems that respects m-homogeneous structures", Appl. Math. Comput.; from memory),
and a system of the same multidegrees whose equations are products of random linear forms,

    G_i = prod_j prod_{k = 1..d_ij} (b_ijk X_0 + a_ijk . Z_j),

has exactly that many solutions, all regular and known: pick for every equation a group j_i
(each group picked by exactly k_j equations) and a factor of that group, and solve the k_j
linear equations of each group. The homotopy runs in the same projective patch as the
total-degree one (X_0 the homogenising coordinate); each target equation is homogenised to the
degree sum_j d_ij of its start equation, so the straight-line homotopy stays homogeneous (the
extra powers of X_0 only add points at infinity, which the paths that diverge reach anyway).

Path k is the k-th (assignment, factor choice) in a fixed order, computed from k alone, so
batches, executors and run folders see the same path k whatever the batch.

Examples
--------
>>> import numpy as np
>>> from numag.system.parse import parse_system
>>> eigen = parse_system(["2*x - l*x + y", "x + 3*y - l*y", "x + y - 1"], ["x", "y", "l"])
>>> groups = VariableGroups.of(eigen, [["x", "y"], ["l"]])
>>> multihomogeneous_bezout(groups.degree_matrix(eigen.polynomials), groups.sizes)
2
>>> start = MultihomogeneousStart.random(eigen.polynomials, groups, np.random.default_rng(0))
>>> start.n_paths, start.solutions().shape
(2, (2, 4))
"""

from dataclasses import dataclass
import enum
import itertools

import numpy as np

from ..errors import InputError
from ..system.polynomial import Polynomial

__all__ = ["GroupSource", "VariableGroups", "multihomogeneous_bezout", "best_groups", "MultihomogeneousStart",
           "homogenized_to"]

#: Variables up to which the automatic grouping tries every partition (Bell(8) = 4140 partitions).
EXHAUSTIVE_GROUPING_VARIABLES = 8
#: Assignments of equations to groups enumerated at most (each is a block of start solutions).
MAX_ASSIGNMENTS = 2_000_000


class GroupSource(enum.Enum):
    """Where a grouping of the variables came from."""

    FILE = "file"
    AUTOMATIC = "automatic"
    NULL_VECTOR = "null vector"
    ONE_GROUP = "one group"


@dataclass(frozen=True)
class VariableGroups:
    """A partition of the affine unknowns into groups (indices into the system's variables).

    Attributes
    ----------
    groups : tuple of tuple of int
    source : GroupSource
    names : tuple of tuple of str
    """

    groups: tuple
    source: GroupSource = GroupSource.FILE
    names: tuple = ()

    @classmethod
    def of(cls, system, named_groups, source=GroupSource.FILE):
        """Groups given by variable names; every variable in exactly one group.

        Raises
        ------
        InputError
            Naming an unknown or repeated variable, or one left out.
        """
        if system.projective:
            raise InputError("variable groups are for affine systems (a projective system has one group)")
        position = {name: k for k, name in enumerate(system.variables)}
        groups, seen = [], set()
        for g, group in enumerate(named_groups, 1):
            if not group:
                raise InputError(f"group {g} is empty")
            indices = []
            for name in group:
                if name not in position:
                    raise InputError(f"group {g} names {str(name)[:40]!r}, which is not a variable")
                if name in seen:
                    raise InputError(f"variable {name!r} is in two groups")
                seen.add(name)
                indices.append(position[name])
            groups.append(tuple(indices))
        missing = [name for name in system.variables if name not in seen]
        if missing:
            raise InputError(f"variable {missing[0]!r} is in no group: every variable must be in one")
        return cls(tuple(groups), source, tuple(tuple(system.variables[k] for k in g) for g in groups))

    @property
    def sizes(self):
        """k_j, the number of variables of each group."""
        return tuple(len(g) for g in self.groups)

    def degree_matrix(self, polynomials):
        """d_ij: the degree of polynomial i in the variables of group j, shape (n, m)."""
        return np.array([[int(p.exponents[:, list(g)].sum(axis=1).max()) if p.n_terms else 0 for g in self.groups]
                         for p in polynomials], dtype=np.int64)

    def report(self):
        """The groups as lists of names and where they came from (for the JSON ``start`` block)."""
        return {"groups": [list(g) for g in self.names], "source": self.source.value}


def multihomogeneous_bezout(degree_matrix, sizes):
    """The coefficient of prod_j z_j^k_j in prod_i sum_j d_ij z_j (an exact integer).

    Parameters
    ----------
    degree_matrix : array_like of int, shape (n, m)
    sizes : sequence of int, summing to n

    Examples
    --------
    >>> multihomogeneous_bezout([[2], [3]], [2])       # one group: the Bezout number
    6
    >>> multihomogeneous_bezout([[1, 1], [1, 1]], [1, 1])  # two bilinear equations in (x, y)
    2
    """
    degrees = np.asarray(degree_matrix, dtype=np.int64)
    sizes = tuple(int(k) for k in sizes)
    if degrees.ndim != 2 or degrees.shape[1] != len(sizes) or sum(sizes) != degrees.shape[0]:
        raise InputError("a multihomogeneous count needs n equations and groups whose sizes add up to n")
    # expand equation by equation, keeping only monomials that can still divide prod z_j^k_j
    counts = {tuple(0 for _ in sizes): 1}
    for row in degrees:
        grown = {}
        for used, count in counts.items():
            for j, d in enumerate(row):
                if d and used[j] < sizes[j]:
                    key = used[:j] + (used[j] + 1,) + used[j + 1:]
                    grown[key] = grown.get(key, 0) + count * int(d)
        counts = grown
    return int(counts.get(sizes, 0))


def _partitions(items):
    """Every set partition of ``items`` (a list), as lists of lists."""
    if not items:
        yield []
        return
    first, rest = items[0], items[1:]
    for partition in _partitions(rest):
        for k in range(len(partition)):
            yield partition[:k] + [[first] + partition[k]] + partition[k + 1:]
        yield [[first]] + partition


def best_groups(system):
    """The grouping with the smallest multihomogeneous Bezout number (ties: fewer groups).

    Every set partition is tried up to :data:`EXHAUSTIVE_GROUPING_VARIABLES` variables; beyond,
    groups are merged greedily from single variables (and one group is always a candidate).

    Returns
    -------
    (VariableGroups, int)
        The grouping (source AUTOMATIC) and its count.

    Examples
    --------
    >>> from numag.system.parse import parse_system
    >>> bilinear = parse_system(["x*u + y*v - 1", "x*v - y + 2*u", "x + y - 1", "u - v + 3"], ["x", "y", "u", "v"])
    >>> groups, count = best_groups(bilinear)
    >>> groups.names, count
    ((('x', 'y'), ('u', 'v')), 2)
    """
    n = system.n_variables
    polynomials = system.polynomials

    def count_of(partition):
        groups = VariableGroups(tuple(tuple(g) for g in partition))
        return multihomogeneous_bezout(groups.degree_matrix(polynomials), groups.sizes)

    if n <= EXHAUSTIVE_GROUPING_VARIABLES:
        candidates = _partitions(list(range(n)))
    else:
        candidates = _greedy_partitions(n, count_of)
    best, best_count = None, None
    for partition in candidates:
        count = count_of(partition)
        if best is None or count < best_count or (count == best_count and len(partition) < len(best)):
            best, best_count = partition, count
    best = sorted((sorted(g) for g in best), key=lambda g: g[0])
    return VariableGroups.of(system, [[system.variables[k] for k in g] for g in best], GroupSource.AUTOMATIC), \
        best_count


def _greedy_partitions(n, count_of):
    """Candidates for many variables: one group, and each stage of a greedy merge from singletons."""
    yield [list(range(n))]
    partition = [[k] for k in range(n)]
    yield partition
    while len(partition) > 1:
        options = []
        for a, b in itertools.combinations(range(len(partition)), 2):
            merged = [g for k, g in enumerate(partition) if k not in (a, b)] + [partition[a] + partition[b]]
            options.append((count_of(merged), merged))
        partition = min(options, key=lambda item: item[0])[1]
        yield partition


def homogenized_to(polynomial, degree):
    """Homogenise with X_0 first to a given degree (at least the polynomial's own).

    Examples
    --------
    >>> x = Polynomial.variable(0, 1)
    >>> homogenized_to(x - 1, 2).to_text(["w", "x"])
    '-1.0*w^2 + 1.0*w*x'
    """
    polynomial = polynomial.numeric()
    exponents = polynomial.exponents
    extra = degree - exponents.sum(axis=1)
    if np.any(extra < 0):
        raise InputError(f"cannot homogenise a polynomial of degree {polynomial.degree} to degree {degree}")
    return Polynomial(np.column_stack([extra, exponents]), polynomial.coefficients, polynomial.n_variables + 1)


class MultihomogeneousStart:
    """G_i = products of random linear forms in X_0 and one group's variables (see the module docstring).

    Parameters
    ----------
    degree_matrix : ndarray of int, shape (n, m)
    groups : VariableGroups
    forms : ndarray of complex, shape (n, D, n + 1)
        Factor f of equation i as coefficients of (X_0, X_1, ..., X_n); factors of group j of
        equation i are numbered from ``offsets[i, j]``; padding factors (f >= degrees[i]) are unused.
    """

    def __init__(self, degree_matrix, groups, forms):
        self.degree_matrix = np.asarray(degree_matrix, dtype=np.int64)
        self.groups = groups
        self.forms = np.asarray(forms, dtype=complex)
        n, m = self.degree_matrix.shape
        self.degrees = self.degree_matrix.sum(axis=1)
        if np.any(self.degrees < 1):
            raise InputError("every equation must have degree at least 1 for a multihomogeneous start")
        self.offsets = np.concatenate([np.zeros((n, 1), dtype=np.int64), np.cumsum(self.degree_matrix, axis=1)[:, :-1]],
                                      axis=1)
        self._valid = np.arange(self.forms.shape[1])[None, :] < self.degrees[:, None]  # (n, D)
        self._assignments, self._blocks = self._enumerate_assignments()
        self._cumulative = np.cumsum(self._blocks)

    @classmethod
    def random(cls, polynomials, groups, rng):
        """Random Gaussian linear forms for the multidegrees of ``polynomials`` (affine, n variables)."""
        degree_matrix = groups.degree_matrix(polynomials)
        n = len(polynomials)
        widest = int(degree_matrix.sum(axis=1).max())
        forms = np.zeros((n, widest, n + 1), dtype=complex)
        for i in range(n):
            f = 0
            for j, group in enumerate(groups.groups):
                columns = [0] + [1 + k for k in group]
                for _ in range(int(degree_matrix[i, j])):
                    forms[i, f, columns] = (rng.standard_normal(len(columns))
                                            + 1j * rng.standard_normal(len(columns))) / np.sqrt(2)
                    f += 1
        return cls(degree_matrix, groups, forms)

    def _enumerate_assignments(self):
        """Every map equation -> group with group j taken k_j times and d_ij > 0, and its block size."""
        sizes = self.groups.sizes
        degree_matrix = self.degree_matrix
        n = len(degree_matrix)
        found, blocks = [], []

        def extend(i, chosen, left, block):
            if i == n:
                found.append(tuple(chosen))
                blocks.append(block)
                if len(found) > MAX_ASSIGNMENTS:
                    raise InputError(f"the grouping has more than {MAX_ASSIGNMENTS:,} ways to pair equations with "
                                     "groups; use fewer groups or another start")
                return
            for j in range(len(sizes)):
                if left[j] and degree_matrix[i, j]:
                    left[j] -= 1
                    chosen.append(j)
                    extend(i + 1, chosen, left, block * int(degree_matrix[i, j]))
                    chosen.pop()
                    left[j] += 1

        extend(0, [], list(sizes), 1)
        return np.array(found, dtype=np.int64).reshape(len(found), n), np.array(blocks, dtype=np.int64)

    @property
    def n_paths(self):
        """The multihomogeneous Bezout number (the number of start solutions)."""
        return int(self._cumulative[-1]) if len(self._cumulative) else 0

    def _linear_forms(self, points):
        values = np.einsum("pc,ifc->pif", points, self.forms)
        return np.where(self._valid[None], values, 1.0)

    def values(self, points):
        """G alone at points (P, n + 1)."""
        return np.prod(self._linear_forms(points), axis=2)

    def evaluate(self, points):
        """G and its (dense) Jacobian at points (P, n + 1), by the product rule without division."""
        forms = self._linear_forms(points)
        count, n, widest = forms.shape
        before = np.ones_like(forms)
        after = np.ones_like(forms)
        if widest > 1:
            before[:, :, 1:] = np.cumprod(forms[:, :, :-1], axis=2)
            after[:, :, :-1] = np.cumprod(forms[:, :, :0:-1], axis=2)[:, :, ::-1]
        others = before * after  # product of every factor but f, exact even where factor f vanishes
        jacobian = np.einsum("pif,ifc->pic", others * self._valid[None], self.forms)
        return before[:, :, -1] * forms[:, :, -1], jacobian

    def evaluate_precise(self, point, ctx):
        """G and its Jacobian at one point in an mpmath context (lists of rows)."""
        n = len(self.degrees)
        size = n + 1
        forms = [[[ctx.mpc(complex(c).real, complex(c).imag) for c in self.forms[i, f]] for f in range(self.degrees[i])]
                 for i in range(n)]
        values, jacobian = [], []
        for i in range(n):
            linear = [sum(a * x for a, x in zip(form, point)) for form in forms[i]]
            value = ctx.mpf(1)
            for v in linear:
                value *= v
            row = [ctx.mpf(0)] * size
            for f, form in enumerate(forms[i]):
                rest = ctx.mpf(1)
                for g, v in enumerate(linear):
                    if g != f:
                        rest *= v
                for c in range(size):
                    row[c] += rest * form[c]
            values.append(value)
            jacobian.append(row)
        return values, jacobian

    def solutions(self, path_indices=None):
        """Start solutions with X_0 = 1, path k computed from k alone (lazily, batch by batch)."""
        indices = np.arange(self.n_paths) if path_indices is None else np.asarray(path_indices, dtype=np.int64)
        if len(indices) and (indices.min() < 0 or indices.max() >= self.n_paths):
            raise InputError(f"path numbers must be from 0 to {self.n_paths - 1}")
        block = np.searchsorted(self._cumulative, indices, side="right")
        within = indices - np.concatenate([[0], self._cumulative])[block]
        assignment = self._assignments[block]  # (P, n): the group of each equation
        count, n = assignment.shape
        chosen_degree = self.degree_matrix[np.arange(n)[None, :], assignment]
        factor = np.empty((count, n), dtype=np.int64)
        rest = within.copy()
        for i in range(n - 1, -1, -1):  # mixed-radix digits of the position in the block
            factor[:, i] = rest % chosen_degree[:, i]
            rest //= chosen_degree[:, i]
        factor += self.offsets[np.arange(n)[None, :], assignment]
        points = np.zeros((count, n + 1), dtype=complex)
        points[:, 0] = 1.0
        order = np.argsort(assignment, axis=1, kind="stable")  # equations grouped by their group
        first = 0
        for j, group in enumerate(self.groups.groups):
            k = len(group)
            equations = order[:, first:first + k]  # (P, k)
            first += k
            chosen = self.forms[equations, np.take_along_axis(factor, equations, axis=1)]  # (P, k, n + 1)
            columns = [1 + c for c in group]
            points[:, columns] = np.linalg.solve(chosen[:, :, columns], -chosen[:, :, 0][:, :, None])[:, :, 0]
        return points
