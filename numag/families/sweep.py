"""Sweeps: the members of a family at many parameter values, by one batched parameter homotopy.

The member at one random complex parameter value p* is solved once (total degree). Its solutions
are then carried to every requested value q_k along p(s) = tau(s) p* + (1 - tau(s)) q_k, with
tau(s) = gamma s / (1 + (gamma - 1) s) the gamma trick (Morgan and Sommese's coefficient-parameter
homotopy: for all but finitely many p* the paths from p*'s solutions reach every isolated solution
of the member at q_k). The parameters move themselves, not the coefficients: a linear combination of
two members is in general no member of the family, and its solutions need not continue those of p*.

All values and all paths are tracked together in one run of :func:`numag.tracking.service.track`
(batches, executors, a Dask cluster, jump repair). The tracker hands the homotopy rows of points
without path numbers, so each point carries its value's number in one extra coordinate,
``(k + 1) * LABEL_UNIT``, held fixed by a unit row of the Jacobian with zero value and zero
derivative (decision 0045).

Examples
--------
>>> from numag.system.parse import parse_system
>>> from numag.system.family import Family
>>> family = Family(parse_system(["x^2 - b"], ["x", "b"]), ("b",))
>>> result = sweep(family, [[1.0], [4.0], [-9.0]], seed=3)
>>> [value.real_count for value in result.values]
[2, 2, 0]
>>> sorted(round(float(z.real), 8) for z in result.values[1].points[:, 0])
[-2.0, 2.0]
"""

from dataclasses import dataclass, field
import time

import numpy as np

from ..errors import InputError, LimitError, ParseError
from ..system.family import Family
from ..system.parse import parse_constant
from ..system.polynomial import Polynomial, PolynomialSystem
from ..run.executor import charge_paths, check_memory, make_executor
from ..numeric.cluster import cluster_labels, groups
from ..numeric.evaluate import BatchEvaluator, PrecisionEvaluator, TermSizes
from ..numeric.scaling import Scaling
from ..numeric.seeds import random_state
from ..tracking.homotopy import random_unit_complex
from ..tracking.service import PathCounts, track
from ..tracking.solve import Execution, SolveOptions, solve_system
from ..tracking.tracker import PathStatus, TrackerOptions
from .centring import centred_family, locate_members
from .records import PointKind, decode_complex, decode_complex_rows, decode_float, encode_complex, encode_float

__all__ = ["SweepOptions", "MemberSolutions", "SweepResult", "SweepHomotopy", "sweep", "move_points", "parse_grid",
           "parse_value",
           "real_by_separation", "judge_real", "LABEL_UNIT", "MAX_VALUES"]

#: The extra coordinate of a path at value k is (k + 1) * LABEL_UNIT: small beside the patch's
#: coordinates (at most 1e-3 for a million values), and far above the round-off it gathers.
LABEL_UNIT = 1e-9
#: Scaled residual under which an endpoint solves the member at another parameter value too (the tracker
#: settles endpoints at 1e-8; a point that is no solution there has a residual of order one).
STATIONARY_RESIDUAL = 1e-6
#: Largest number of parameter values in one sweep.
MAX_VALUES = 1_000_000


@dataclass(frozen=True)
class SweepOptions:
    """Options of :func:`sweep` (defaults declared once).

    Attributes
    ----------
    tracker : TrackerOptions
    batch_size : int
        Paths per batch (all values' paths are cut into batches together).
    cluster_tolerance : float
        Relative distance under which two endpoints of one value are one point (a rank drop).
    real_tolerance : float
        Largest relative imaginary part of a real solution. A solution whose imaginary part is larger is still
        real when it is below ``real_separation`` of its distance to the member's nearest other solution and no
        path of the member failed (:func:`real_by_separation`).
    real_separation : float
        The scale-free realness test's fraction (a non-real solution of a real member has its conjugate among
        the solutions: its imaginary part is at least half its distance to the nearest one).
    singular_condition : float
        Condition number of J_x above which a solution is a rank-drop point.
    split_clusters : bool
        Pull apart several paths of one value ending at one point (:func:`split_cluster`): roots of a member
        within about 1e-10 of the discriminant are closer than the endpoints' accuracy. At most 64 clusters
        per sweep are tried (a family whose every member has a multiple root would pay it at every value).
    balance : bool
        Track in balanced units (:class:`~numag.numeric.scaling.Scaling` of x and p together, powers of
        ten): a family in millimetres sweeps as in metres. Points and values are reported in the user's units.
    start : str
        The start system of the one solve at the random value ("total-degree", "polyhedral", ...; see
        :class:`~numag.tracking.solve.SolveOptions`).
    solve_again : bool
        Solve members in doubt (failed paths, undecided points) again on their own, at most 16 per sweep
        (decision 0143); an answer that is complete replaces the member's.
    centre : bool
        Where the random member's solutions lie far from the origin compared with their distances, sweep the
        family written exactly in x-coordinates centred at them (:mod:`numag.families.centring`, decision 0082);
        points are reported in the user's coordinates.
    """

    tracker: TrackerOptions = TrackerOptions()
    batch_size: int = 8192
    cluster_tolerance: float = 1e-6
    real_tolerance: float = 1e-8
    real_separation: float = 1e-3
    singular_condition: float = 1e8
    split_clusters: bool = True
    balance: bool = True
    start: str = "total-degree"
    centre: bool = True
    solve_again: bool = True


class SweepHomotopy:
    """H(X, s) = F^h(X; p_k(s)) for many target values at once, p_k(s) = tau(s) p* + (1 - tau(s)) q_k.

    Points are ``(X_0, X_1, ..., X_n, label)``: homogeneous coordinates of x on the random patch
    a . X = 1, then the label ``(k + 1) * LABEL_UNIT`` of the target value q_k. Rows: the n
    equations, the label row (value 0, Jacobian a unit row, no s-derivative: the label never moves),
    and the patch.

    Parameters
    ----------
    family : Family
        A square family (as many equations as variables).
    start_values : ndarray, shape (m,) or (K, m)
        p*, where the start solutions are known (one per target value for :meth:`start_points_each`).
    targets : ndarray, shape (K, m)
        q_0, ..., q_{K-1}.
    patch : ndarray, shape (n + 1,)
    gamma : complex
    """

    def __init__(self, family, start_values, targets, patch, gamma):
        n, m = family.n_variables, family.n_parameters
        # homogenised in x alone: the parameters are numbers along the path, not coordinates
        self.target = [_homogenized_in_x(p.numeric(), n) for p in family.system.polynomials]
        self.n, self.m = n, m
        self.targets = np.asarray(targets, dtype=complex).reshape(-1, m)
        self.start_values = np.asarray(start_values, dtype=complex)
        self.start_values = (self.start_values.reshape(m) if self.start_values.size == m and self.start_values.ndim < 2
                             else self.start_values.reshape(len(self.targets), m))
        self.patch = np.asarray(patch, dtype=complex)
        self.gamma = complex(gamma)
        self.size = n + 2
        self.evaluator = BatchEvaluator(self.target)
        self._sizes = TermSizes(self.target)
        self.evaluations = 0
        self.value_evaluations = 0
        self._precise = None  # built on the first rescue in mpmath

    def labels_of(self, points):
        """The value number of each point (from its label coordinate; -1 for a failed path's non-finite point)."""
        label = np.nan_to_num(points[:, -1].real / LABEL_UNIT, nan=0.0, posinf=0.0, neginf=0.0)
        return np.rint(label).astype(np.int64) - 1

    def system_of(self, points):
        """The value number of each point: the tracking service never takes endpoints of two values for one."""
        return self.labels_of(points)

    def start_points(self, solutions):
        """Every start solution for every target value: path k * S + j is value k, solution j."""
        solutions = np.atleast_2d(np.asarray(solutions, dtype=complex))
        homogeneous = np.column_stack([np.ones(len(solutions), dtype=complex), solutions])
        homogeneous /= (homogeneous @ self.patch)[:, None]
        count = len(self.targets)
        labels = (np.arange(count, dtype=float) + 1) * LABEL_UNIT
        points = np.empty((count * len(solutions), self.size), dtype=complex)
        points[:, :-1] = np.tile(homogeneous, (count, 1))
        points[:, -1] = np.repeat(labels, len(solutions))
        return points

    def _parameters(self, points, s):
        """p(s) per row and dp/ds per row, each (P, m)."""
        labels = np.clip(self.labels_of(points), 0, len(self.targets) - 1)
        q = self.targets[labels]
        start = self.start_values[None, :] if self.start_values.ndim == 1 else self.start_values[labels]
        s = np.asarray(s, dtype=complex)
        denominator = 1 + (self.gamma - 1) * s
        tau, dtau = self.gamma * s / denominator, self.gamma / denominator ** 2
        p = tau[:, None] * start + (1 - tau)[:, None] * q
        return p, dtau[:, None] * (start - q)

    def start_points_each(self, points):
        """One path per target value: path k starts at ``points[k]`` (a solution at ``start_values[k]``)."""
        points = np.atleast_2d(np.asarray(points, dtype=complex))
        homogeneous = np.column_stack([np.ones(len(points), dtype=complex), points])
        homogeneous /= (homogeneous @ self.patch)[:, None]
        return np.column_stack([homogeneous, (np.arange(len(points), dtype=float) + 1) * LABEL_UNIT])

    def _full(self, points, s):
        p, dp = self._parameters(points, s)
        return np.column_stack([points[:, :-1], p]), dp

    def evaluate(self, points, s):
        """H, dH/dX (label and patch rows included) and dH/ds at points (P, n + 2)."""
        self.evaluations += 1
        count, size, n = len(points), self.size, self.n
        full, dp = self._full(points, s)
        g_values, g_jac = self.evaluator.evaluate(full)
        values = np.zeros((count, size), dtype=complex)
        values[:, :n] = g_values
        values[:, -1] = points[:, :-1] @ self.patch - 1
        jacobian = np.zeros((count, size, size), dtype=complex)
        jacobian[:, :n, :n + 1] = g_jac[:, :, :n + 1]
        jacobian[:, n, n + 1] = 1.0
        jacobian[:, -1, :n + 1] = self.patch
        derivative = np.zeros((count, size), dtype=complex)
        derivative[:, :n] = np.einsum("pij,pj->pi", g_jac[:, :, n + 1:], dp)
        return values, jacobian, derivative

    def evaluate_values(self, points, s):
        """H alone (what the chord corrector needs)."""
        self.value_evaluations += 1
        full, _ = self._full(points, s)
        values = np.zeros((len(points), self.size), dtype=complex)
        values[:, :self.n] = self.evaluator.evaluate(full, jacobian=False)
        values[:, -1] = points[:, :-1] @ self.patch - 1
        return values

    def evaluate_precise(self, point, s, ctx):
        """H, dH/dX and dH/ds at one point in an mpmath context (the tracker's rescue of failed paths).

        Same rows as :meth:`evaluate`; the label is read in double (it only names the target value).
        Returns ctx matrices of shapes (N, 1), (N, N) and (N, 1).
        """
        if self._precise is None:
            self._precise = PrecisionEvaluator(self.target)
        n, m, size = self.n, self.m, self.size
        label = int(np.clip(round(float(ctx.re(point[-1])) / LABEL_UNIT) - 1, 0, len(self.targets) - 1))
        start = self.start_values if self.start_values.ndim == 1 else self.start_values[label]
        q = [ctx.mpc(v.real, v.imag) for v in self.targets[label]]
        p_start = [ctx.mpc(v.real, v.imag) for v in start]
        gamma = ctx.mpc(self.gamma.real, self.gamma.imag)
        denominator = 1 + (gamma - 1) * s
        tau, dtau = gamma * s / denominator, gamma / denominator ** 2
        p = [tau * a + (1 - tau) * b for a, b in zip(p_start, q)]
        dp = [dtau * (a - b) for a, b in zip(p_start, q)]
        f_values, f_jac = self._precise.evaluate(list(point[:n + 1]) + p, ctx)
        values, jacobian, derivative = ctx.matrix(size, 1), ctx.matrix(size, size), ctx.matrix(size, 1)
        for i in range(n):
            values[i] = f_values[i]
            derivative[i] = sum(f_jac[i, n + 1 + j] * dp[j] for j in range(m))
            for j in range(n + 1):
                jacobian[i, j] = f_jac[i, j]
        jacobian[n, n + 1] = 1  # the label row: value 0, the label never moves
        patch = [ctx.mpc(a.real, a.imag) for a in self.patch]
        values[size - 1] = sum(a * x for a, x in zip(patch, point[:n + 1])) - 1
        for j in range(n + 1):
            jacobian[size - 1, j] = patch[j]
        return values, jacobian, derivative

    def row_scales(self, points):
        """Sizes of the equations' gradient terms, then 1 for the label row."""
        full, _ = self._full(points, np.zeros(len(points)))
        return np.column_stack([self._sizes.gradients(full), np.ones(len(points))])

    def stationary(self, points):
        """Which points solve the homotopy at every s (checked at s = 1 and s = 1/2 besides the target): points
        at infinity that every member has, where no path from a finite start ends regularly (decision 0104)."""
        full = [self._full(points, np.full(len(points), s))[0] for s in (1.0, 0.5)]
        return np.all([np.linalg.norm(self.evaluator.evaluate(f, jacobian=False) / self._sizes.values(f), axis=1)
                       <= STATIONARY_RESIDUAL for f in full], axis=0)

    def target_residual(self, points):
        """Scaled residual of the member at each point's own target value."""
        full, _ = self._full(points, np.zeros(len(points)))
        values = self.evaluator.evaluate(full, jacobian=False)
        return np.linalg.norm(values / self._sizes.values(full), axis=1)


def _homogenized_in_x(polynomial, n):
    """X_0^(deg_x f) f(X / X_0; p): homogeneous in (X_0, X) alone, the parameters left as they are."""
    exponents = polynomial.exponents
    x_degrees = exponents[:, :n].sum(axis=1)
    top = int(x_degrees.max()) if len(x_degrees) else 0
    return Polynomial(np.column_stack([top - x_degrees, exponents]), polynomial.numeric_coefficients(),
                      polynomial.n_variables + 1)


@dataclass
class MemberSolutions:
    """The solutions of the member at one parameter value.

    Attributes
    ----------
    parameters : ndarray of complex, shape (m,)
    points : ndarray, shape (S, n)
        Distinct finite endpoints.
    real : ndarray of bool, shape (S,)
    kinds : list of PointKind
        REGULAR, or RANK_DROP where J_x is singular (several paths meet, or its condition is above
        ``singular_condition``): the value lies on the discriminant.
    paths : ndarray of int, shape (S,)
        Paths ending at each point.
    failed : int
        Paths of this value that failed (counted, never dropped silently).
    at_infinity : int
        Paths of this value that went to infinity.
    undecided : int
        Points neither real nor paired with their conjugate (:func:`judge_real`): the real count is not sure.
    """

    parameters: np.ndarray
    points: np.ndarray
    real: np.ndarray
    kinds: list
    paths: np.ndarray
    failed: int = 0
    at_infinity: int = 0
    undecided: int = 0

    @property
    def real_count(self):
        """The number of distinct real solutions."""
        return int(np.sum(self.real))

    @property
    def rank_drops(self):
        """The points where J_x drops rank."""
        return self.points[[k == PointKind.RANK_DROP for k in self.kinds]] if len(self.points) else self.points

    def to_dict(self):
        return {"parameters": encode_complex(self.parameters), "points": encode_complex(self.points),
                "real": [bool(r) for r in self.real], "kinds": [k.value for k in self.kinds],
                "paths": [int(p) for p in self.paths], "failed": int(self.failed), "at_infinity": int(self.at_infinity),
                "undecided": int(self.undecided)}

    @classmethod
    def from_dict(cls, data):
        points = decode_complex(data["points"]) if data["points"] else np.zeros((0, 0), dtype=complex)
        return cls(decode_complex(data["parameters"]), points, np.array(data["real"], dtype=bool),
                   [PointKind(k) for k in data["kinds"]], np.array(data["paths"], dtype=np.int64),
                   int(data["failed"]), int(data["at_infinity"]), int(data.get("undecided", 0)))


@dataclass
class SweepResult:
    """Result of :func:`sweep`.

    Attributes
    ----------
    variables, parameters : tuple of str
    equations : list of str
    values : list of MemberSolutions
        One per requested parameter value, in order.
    start_parameters : ndarray of complex
        The random complex value p* solved first.
    start_solutions : int
        Its number of isolated finite solutions (the paths per value).
    paths : dict
        Tracked paths by status over the whole sweep.
    seed : int
    seconds : float
    execution : dict
    start_multiple : ndarray of complex, shape (M, n)
        Isolated solutions of multiplicity 2 or more of the member at p* (not moved: a path through a multiple
        point is singular all along; where that happens for a random p* the discriminant has a multiple
        component, such as a length 0 of a linkage that enters squared). Not saved.
    """

    variables: tuple
    parameters: tuple
    equations: list
    values: list
    start_parameters: np.ndarray
    start_solutions: int
    paths: dict
    seed: int
    seconds: float
    execution: dict = field(default_factory=dict)
    start_multiple: np.ndarray = field(default_factory=lambda: np.zeros((0, 0), dtype=complex))

    @property
    def failed(self):
        """Paths that failed, over all values."""
        return sum(v.failed for v in self.values)

    @property
    def undecided(self):
        """Points whose real or complex judgement is undecided, over all values (decision 0104)."""
        return sum(v.undecided for v in self.values)

    def real_counts(self):
        """Distinct real solutions per value, shape (K,)."""
        return np.array([v.real_count for v in self.values], dtype=np.int64)

    def to_dict(self):
        return {"kind": "sweep", "variables": list(self.variables), "parameters": list(self.parameters),
                "equations": list(self.equations), "start_parameters": encode_complex(self.start_parameters),
                "start_solutions": int(self.start_solutions), "paths": dict(self.paths), "seed": int(self.seed),
                "seconds": encode_float(self.seconds), "execution": _plain(self.execution),
                "values": [v.to_dict() for v in self.values],
                "start_multiple": encode_complex(self.start_multiple),
                "start_multiple_columns": int(self.start_multiple.shape[1])}

    @classmethod
    def from_dict(cls, data):
        result = cls(tuple(data["variables"]), tuple(data["parameters"]), list(data["equations"]),
                     [MemberSolutions.from_dict(v) for v in data["values"]], decode_complex(data["start_parameters"]),
                     int(data["start_solutions"]), dict(data["paths"]), int(data["seed"]),
                     decode_float(data["seconds"]), dict(data.get("execution", {})))
        if "start_multiple" in data:  # absent before decision 0078
            result.start_multiple = decode_complex_rows(data["start_multiple"], data["start_multiple_columns"])
        return result


def _plain(data):
    """JSON-safe copy of an execution summary."""
    if isinstance(data, dict):
        return {str(k): _plain(v) for k, v in data.items()}
    if isinstance(data, (list, tuple)):
        return [_plain(v) for v in data]
    if isinstance(data, (np.integer,)):
        return int(data)
    if isinstance(data, (float, np.floating)):
        return encode_float(data)
    return data


def parse_value(text):
    """A parameter value written as a rational number in the equations' grammar (``2``, ``-0.5``, ``4/2``,
    ``1e-3``), exactly; never evaluated as code.

    Returns
    -------
    fractions.Fraction

    Raises
    ------
    InputError
        For text that is not a real rational number, or one beyond the double range.

    Examples
    --------
    >>> parse_value("4/2"), parse_value("1.9999999999")
    (Fraction(2, 1), Fraction(19999999999, 10000000000))
    """
    try:
        value = parse_constant(str(text).strip()).as_fraction()
    except (ParseError, InputError):
        raise InputError(f"{str(text).strip()[:40]!r} is not a rational number (such as 2, -0.5, 4/2 or 1e-3)") \
            from None
    _to_double(value)
    return value


def _to_double(value):
    """The double nearest a Fraction (rounded once), or InputError beyond the double range (or so small that it
    would round to 0: another member of the family)."""
    try:
        rounded = float(value)
        if rounded == 0 and value != 0:
            raise InputError(f"a value of about 10^{_decimal_exponent(value)} is below the double range (it would "
                             "be read as 0)")
        return rounded
    except OverflowError:
        # the size in a power of ten: the first 40 digits of 10^400 read as 10^39
        raise InputError(f"a value of about 10^{_decimal_exponent(value)} is beyond the double range "
                         f"(about 1.8e308)") from None


def _decimal_exponent(value):
    """The power of ten of a Fraction's size, exactly in integers (no float: it is beyond the double range).

    Examples
    --------
    >>> from fractions import Fraction
    >>> _decimal_exponent(Fraction(10) ** 400), _decimal_exponent(-Fraction(3, 10 ** 500))
    (400, -500)
    """
    numerator, denominator = abs(value.numerator), value.denominator
    exponent = len(str(numerator)) - len(str(denominator))
    # 10^e <= |value| < 10^(e + 1)
    if numerator * 10 ** max(0, -exponent) < denominator * 10 ** max(0, exponent):
        exponent -= 1
    return exponent


def parse_grid(text, parameters):
    """Read ``b=0:10:1001`` (name=start:stop:count, evenly spaced, ends included; several joined by ``;``
    make a product grid) into values, shape (K, m).

    Examples
    --------
    >>> parse_grid("b=0:1:3", ["b"]).tolist()
    [[0.0], [0.5], [1.0]]
    >>> parse_grid("p=0:1:2; q=5:6:2", ["p", "q"]).shape
    (4, 2)
    """
    axes = {}
    for item in str(text).split(";"):
        name, sep, spec = item.partition("=")
        name = name.strip()
        if not sep or name not in parameters:
            raise InputError(f"--grid: {item.strip()[:40]!r} is not name=start:stop:count for a parameter "
                             f"({', '.join(parameters)})")
        if name in axes:
            raise InputError(f"--grid: {name} is given twice")
        pieces = spec.split(":")
        try:
            start, stop, count = parse_value(pieces[0]), parse_value(pieces[1]), int(pieces[2])
        except InputError as error:
            if "double range" in str(error):  # a number, but one a double cannot hold: say which
                raise InputError(f"--grid: {name}: {error}") from None
            raise InputError(f"--grid: {spec.strip()[:40]!r} is not start:stop:count (start and stop rational "
                             "numbers, count an integer)") from None
        except (ValueError, IndexError):
            raise InputError(f"--grid: {spec.strip()[:40]!r} is not start:stop:count (start and stop rational "
                             "numbers, count an integer)") from None
        if len(pieces) != 3 or not 1 <= count <= MAX_VALUES:
            raise InputError(f"--grid: {name} needs a count from 1 to {MAX_VALUES:,}")
        # each value exact, a + k (b - a) / (n - 1), then rounded once: 0.2:2.6:5 holds 2 itself, not a double
        # next to it (a member on the discriminant is not one beside it)
        step = (stop - start) / max(count - 1, 1)
        axes[name] = np.array([_to_double(start + k * step) for k in range(count)])
    missing = [p for p in parameters if p not in axes]
    if missing:
        raise InputError(f"--grid: no values for {', '.join(missing)}")
    mesh = np.meshgrid(*[axes[p] for p in parameters], indexing="ij")
    values = np.column_stack([axis.ravel() for axis in mesh])
    if len(values) > MAX_VALUES:
        raise InputError(f"--grid: {len(values):,} values, over the limit of {MAX_VALUES:,}")
    return values


def sweep(family, values, options=None, seed=None, progress=None, execution=None):
    """Solve the members of a square family at many parameter values by one batched parameter homotopy.

    Parameters
    ----------
    family : Family
        As many equations as variables (isolated solutions for generic parameters).
    values : array_like, shape (K, m)
        Parameter values (real or complex).
    options : SweepOptions, optional
    seed : int, optional
    progress : callable, optional
        a :class:`~numag.run.progress.Progress` (path counts from the tracking service).
    execution : Execution, optional
        Workers or a Dask scheduler for the batches (as for ``solve_system``).

    Returns
    -------
    SweepResult

    Raises
    ------
    InputError
        For a family that is not square, values of the wrong shape, or non-finite values.
    """
    options = options or SweepOptions()
    if not isinstance(family, Family) or not family.parameters:
        raise InputError("a sweep needs a family with parameters")
    if family.system.n_equations != family.n_variables:
        raise InputError(f"a sweep needs isolated solutions: the family has {family.system.n_equations} equations in "
                         f"{family.n_variables} variables (add equations, e.g. fix an input angle)")
    values = np.asarray(values, dtype=complex)
    if values.ndim != 2 or values.shape[1] != family.n_parameters or not len(values):
        raise InputError(f"expected parameter values of shape (K, {family.n_parameters})")
    if not np.all(np.isfinite(values)) or len(values) > MAX_VALUES:
        raise InputError(f"parameter values must be finite, at most {MAX_VALUES:,} of them")
    seed, rng = random_state(seed)
    started = time.perf_counter()
    user_family, user_values = family, values
    family, x_factors, p_factors = _in_computed_units(family, options.balance)
    values = values / p_factors
    start_parameters = (rng.standard_normal(family.n_parameters) + 1j * rng.standard_normal(family.n_parameters))
    # no second look of solve's own (decision 0081): the sweep centres its family itself (decision 0082), and the
    # start member's points must be the paths' own ends, each moved to every value
    start = solve_system(family.member(list(start_parameters)),
                         SolveOptions(tracker=options.tracker, start=options.start, second_look=False),
                         seed=int(rng.integers(2 ** 63)))
    x_centre = np.zeros(family.n_variables)
    # its own generator: the sweep's draws stay as without the look
    centring = locate_members(user_family, user_values, seed=int(np.random.default_rng([seed, 82]).integers(
        2 ** 63))).centring if options.centre else None
    try:
        centred = None if centring is None else centred_family(user_family, centring)
    except LimitError:  # too large to write out about another origin: swept where it is, as before
        centred = None
    if centred is not None:
        # solutions far from the origin compared with their distances: their features are cancellations double
        # precision cannot see (decision 0082); the same sweep in exact centred x-coordinates, points moved back
        x_centre = centring.point[:family.n_variables]
        family, x_factors, p_factors = _in_computed_units(centred, options.balance)
        values = user_values / p_factors
        start = solve_system(family.member(list(start_parameters)),
                             SolveOptions(tracker=options.tracker, start=options.start, second_look=False),
                             seed=int(rng.integers(2 ** 63)))
    solutions, multiple, unresolved = _start_solutions(family, start, start_parameters, options.cluster_tolerance)
    start_failed = int(PathCounts.of(start.status).failed)
    size = family.n_variables + 2
    total = len(values) * len(solutions)
    charge_paths(total, "the sweep's parameter homotopy")
    check_memory(total * (size * 16 + 80), f"keeping {total} paths")

    def fresh_homotopy():  # another gamma and patch for every path (the jump repair's round)
        patch = (rng.standard_normal(size - 1) + 1j * rng.standard_normal(size - 1)) / np.sqrt(2 * (size - 1))
        made = SweepHomotopy(family, start_parameters, values, patch, random_unit_complex(rng))
        return made, made.start_points(solutions)

    homotopy, starts = fresh_homotopy()
    execution = execution or Execution()
    executor = execution.executor or (lambda batches: make_executor(execution.workers, execution.scheduler,
                                                                    execution.local_dask, batches=batches))
    if total:
        run = track(homotopy, starts, options.tracker, executor=executor, batch_size=options.batch_size,
                    progress=progress, fresh_homotopy=fresh_homotopy)
        # the split works in the user's units about the tracked origin: the centred family where it was centred
        exact = (user_family if centred is None else centred, x_factors, user_values)
        members, counts, description = _members(family, run, values, len(solutions), options, exact), \
            run.counts.report(), dict(run.execution)
    else:
        members = [MemberSolutions(v, np.zeros((0, family.n_variables), complex), np.zeros(0, bool), [],
                                   np.zeros(0, np.int64)) for v in values]
        counts, description = PathCounts().report(), {}
    for member, value in zip(members, user_values):  # back to the user's units
        member.parameters = value
        # the random member's unresolved cluster was not moved: every member may miss its roots (undecided)
        member.undecided += unresolved
        member.points = member.points * x_factors + x_centre
    again = _solve_again(user_family, members, len(solutions) + unresolved, options,
                         np.random.default_rng([seed, 143])) if options.solve_again else 0  # its own draws
    counts = dict(counts)
    counts["solved_again"] = again
    counts["start_failed"] = start_failed
    return SweepResult(user_family.variables, user_family.parameters, user_family.system.to_texts(), members,
                       start_parameters * p_factors, len(solutions), counts, seed, time.perf_counter() - started,
                       description, multiple * x_factors + x_centre)


def _start_solutions(family, start, start_parameters, tolerance):
    """The random member's simple solutions, its unresolved multiple points, and their paths.

    A family's member at a random complex value has only simple roots unless every member has a multiple root
    or roots too close for double precision. So an endpoint group of several paths is pulled apart at 40
    digits (:func:`split_cluster`, decision 0143): its roots join the starts. A group that stays one point is
    not moved (a path through a multiple point is singular all along), and its paths are counted: every
    member's count is undecided by as many roots (decision 0143), never silently short of them. Roots split
    apart by less than the sweep's own ``tolerance`` (relative, as its endpoints are grouped) also stay one
    group: double precision cannot keep their paths apart, and every member would group them again
    (decision 0143 amendment: a doubled discriminant line's pair, 1e-14 apart, had been moved and its paths
    failed by the hundred).
    """
    n = family.n_variables
    simple, multiple, unresolved, evaluator = [], [], 0, None
    for solution in start.solutions:
        if not solution.isolated:
            continue
        if solution.multiplicity == 1:
            simple.append(solution.point)
            continue
        evaluator = evaluator or PrecisionEvaluator(family.system.polynomials)
        split = split_cluster(evaluator, np.asarray(solution.point, dtype=complex), np.asarray(start_parameters),
                              int(solution.multiplicity))
        if split is not None and len(split[0]) > 1 and _has_close_pair(split[0], tolerance):
            split = None  # closer than the sweep's paths can be kept apart
        if split is None:
            multiple.append(solution.point)
            unresolved += int(solution.multiplicity)
        else:
            simple.extend(split[0])
    return (np.array(simple, dtype=complex).reshape(-1, n), np.array(multiple, dtype=complex).reshape(-1, n),
            unresolved)


def _solve_again(family, members, expected, options, rng):
    """Members whose count is in doubt (failed paths, undecided points) solved on their own (decision 0143).

    Each such member, up to :data:`_SOLVE_AGAIN_TRIES`, is solved from scratch at its value taken exactly (every
    double is a rational), with solve's second look at close or multiple endpoint groups in exact centred
    coordinates (decision 0081): roots closer than the parameter homotopy's double precision resolves along
    the way. Its answer replaces the member's only when it is complete: no failed path, nothing undecided
    or not isolated, every real judgement made, and the paths at its finite points (simple ones once, a
    multiple one as often as its multiplicity) as many as the sweep's start solutions (``expected``: a
    member of lower count keeps its doubt). Returns how many members were settled so.
    """
    from ..system.exact import ExactCoefficient
    tries = settled = 0
    for member in members:
        if not (member.failed or member.undecided) or tries >= _SOLVE_AGAIN_TRIES:
            continue
        tries += 1
        value = np.asarray(member.parameters, dtype=complex)
        result = solve_system(family.member([ExactCoefficient.from_complex(v) for v in value]),
                              SolveOptions(tracker=options.tracker, start=options.start),
                              seed=int(rng.integers(2 ** 63)))
        found = [s for s in result.solutions if s.isolated]
        real_value = family.system.has_real_coefficients and not np.any(value.imag)
        if (PathCounts.of(result.status).failed or result.undecided or result.not_isolated or result.discarded
                or len(found) < len(result.solutions) or sum(s.multiplicity for s in found) != expected
                or (real_value and any(s.real is None for s in found))):
            continue
        member.points = np.array([s.point for s in found], dtype=complex).reshape(-1, family.n_variables)
        member.real = np.array([bool(real_value and s.real) for s in found], dtype=bool)
        member.kinds = [PointKind.REGULAR if s.multiplicity == 1 else PointKind.RANK_DROP for s in found]
        member.paths = np.array([s.multiplicity for s in found], dtype=np.int64)
        member.failed = member.at_infinity = member.undecided = 0
        settled += 1
    return settled


#: Members in doubt solved again per sweep (:func:`_solve_again`): a solve of one member costs about what the
#: sweep's start did, and a family whose every member is in doubt would otherwise pay it at every value.
_SOLVE_AGAIN_TRIES = 16


def _in_computed_units(family, balance):
    """The family in balanced units (x and p scaled together by powers of ten) and the factors of x and p.

    x_user = x_factors * x_computed, p_user = p_factors * p_computed (decision 0002: every threshold is
    relative to numbers of order one; powers of ten keep exact input exact).
    """
    n = family.n_variables
    if not balance:
        return family, np.ones(n), np.ones(family.n_parameters)
    scaling = Scaling.balancing(family.system)
    if scaling.is_identity:
        return family, np.ones(n), np.ones(family.n_parameters)
    factors = scaling.variable_factors
    return Family(scaling.scale_system(family.system), family.parameters), factors[:n], factors[n:]


def move_points(family, start_values, points, targets, real_segment=False, seed=None, options=None, *, per_path=False):
    """Move one known solution per path from its own parameter value to its own target, all paths together.

    Parameters
    ----------
    family : Family
        Square.
    start_values, targets : array_like, shape (K, m)
    points : array_like, shape (K, n)
        ``points[k]`` solves the member at ``start_values[k]``.
    real_segment : bool
        Move along the straight segment (gamma = 1): real points of real members stay real, and the
        endpoint is the continuation along the real segment (what connects arcs of a real curve).
    seed : int, optional
    options : SweepOptions, optional
    per_path : bool
        Return which paths failed instead of their number (a NaN endpoint of a path that did not fail went
        to infinity).

    Returns
    -------
    ndarray, shape (K, n)
        Endpoints (NaN where the path failed or went to infinity).
    int, or ndarray of bool, shape (K,)
        Failed paths (their number, or which with ``per_path``).

    Examples
    --------
    >>> from numag.system.parse import parse_system
    >>> family = Family(parse_system(["x^2 - b"], ["x", "b"]), ("b",))
    >>> ends, failed = move_points(family, [[1.0], [1.0]], [[1.0], [-1.0]], [[4.0], [9.0]], real_segment=True)
    >>> np.round(ends.real, 8).tolist(), failed
    ([[2.0], [-3.0]], 0)
    """
    options = options or SweepOptions()
    _, rng = random_state(seed)
    targets = np.asarray(targets, dtype=complex).reshape(-1, family.n_parameters)
    points = np.asarray(points, dtype=complex).reshape(len(targets), family.n_variables)
    if len(targets) == 0:
        return np.zeros((0, family.n_variables), dtype=complex), (np.zeros(0, dtype=bool) if per_path else 0)
    family, x_factors, p_factors = _in_computed_units(family, options.balance)
    targets, points = targets / p_factors, points / x_factors
    start_values = np.asarray(start_values, dtype=complex).reshape(len(targets), family.n_parameters) / p_factors
    size = family.n_variables + 2
    charge_paths(len(targets), "moving points between members")

    def fresh_homotopy():
        patch = (rng.standard_normal(size - 1) + 1j * rng.standard_normal(size - 1)) / np.sqrt(2 * (size - 1))
        gamma = 1.0 if real_segment else random_unit_complex(rng)
        made = SweepHomotopy(family, start_values, targets, patch, gamma)
        return made, made.start_points_each(points)

    homotopy, starts = fresh_homotopy()
    run = track(homotopy, starts, options.tracker, batch_size=options.batch_size, fresh_homotopy=fresh_homotopy)
    finite = (run.status == PathStatus.CONVERGED) | (run.status == PathStatus.SINGULAR_ENDPOINT)
    with np.errstate(all="ignore"):
        ends = run.endpoints[:, 1:-1] / run.endpoints[:, :1]
    ends[~finite] = np.nan
    failed = run.status >= PathStatus.FAILED_MIN_STEP
    return ends * x_factors, (failed if per_path else int(np.sum(failed)))


def _members(family, run, values, per_value, options, exact=None):
    """Group the endpoints by value: distinct points, real flags, rank drops, failures.

    ``exact``: (the user's family, the factors of x, the user's values), where clusters are split: a value
    such as q = 2 is exact in binary in the user's units but not once divided by a power of ten.
    """
    n = family.n_variables
    real_family = family.system.has_real_coefficients
    status = run.status.reshape(len(values), per_value)
    ends = run.endpoints.reshape(len(values), per_value, n + 2)
    condition = run.condition.reshape(len(values), per_value)
    finite = (status == PathStatus.CONVERGED) | (status == PathStatus.SINGULAR_ENDPOINT)
    with np.errstate(all="ignore"):
        affine = ends[:, :, 1:n + 1] / ends[:, :, :1]
    members, evaluator, tries = [], None, 0
    for k, value in enumerate(values):
        rows = np.nonzero(finite[k])[0]
        failed = int(np.sum(status[k] >= PathStatus.FAILED_MIN_STEP))
        infinite = int(np.sum(status[k] == PathStatus.AT_INFINITY))
        if infinite:
            # an end at infinity needs a zero of the member's top-degree forms in x near its direction (a monic
            # equation has none); without one the path is failed, not at infinity (decision 0143)
            unseen = _without_zero_at_infinity(family, value, ends[k, status[k] == PathStatus.AT_INFINITY, :n + 1],
                                               options.cluster_tolerance)
            failed, infinite = failed + unseen, infinite - unseen
        points = affine[k, rows]
        if len(rows) == 0:
            members.append(MemberSolutions(value, np.zeros((0, n), complex), np.zeros(0, bool), [],
                                           np.zeros(0, np.int64), failed, infinite))
            continue
        if len(rows) > 1 and _has_close_pair(points, options.cluster_tolerance):
            labels = cluster_labels(points, options.cluster_tolerance)
            members_of = groups(labels)
        else:  # the common case: distinct regular endpoints, nothing to cluster
            members_of = [np.array([j]) for j in range(len(rows))]
        distinct, kinds, paths, settled, resolved, unsure = [], [], [], {}, [], 0
        for group in members_of:
            best = group[np.argmin(condition[k, rows[group]])]
            singular = len(group) > 1 or np.any(status[k, rows[group]] == PathStatus.SINGULAR_ENDPOINT) \
                or condition[k, rows[best]] > options.singular_condition
            split = None
            if singular and options.split_clusters and tries < _SPLIT_TRIES:
                tries += 1
                # roots closer than the endpoints' accuracy (within about 1e-10 of the discriminant) came back
                # as one point: pulled apart at 40 digits, or left as a rank drop if they are one root. A single
                # path at a rank drop is a contradiction (a root of multiplicity mu is the end of mu paths): the
                # endgame took two close simple roots for one double root (decision 0134); every root near its
                # end is found at 40 digits, without a count
                user_family, x_factors, user_values = exact or (family, np.ones(n), values)
                evaluator = evaluator or PrecisionEvaluator(user_family.system.polynomials)
                split = split_cluster(evaluator, points[best] * x_factors, np.asarray(user_values[k]),
                                      len(group) if len(group) > 1 else None)
                split = None if split is None else (split[0] / x_factors, split[1])
            if split is not None:
                if len(group) == 1:
                    resolved.append(range(len(distinct), len(distinct) + len(split[0])))
                for point, is_real in zip(*split):
                    settled[len(distinct)] = bool(is_real)
                    distinct.append(point)
                    kinds.append(PointKind.REGULAR)
                    paths.append(1)
                continue
            distinct.append(points[best])
            kinds.append(PointKind.RANK_DROP if singular else PointKind.REGULAR)
            paths.append(len(group))
            unsure += int(singular and len(group) == 1)  # not resolved: neither a rank drop nor a simple root
        if resolved:
            distinct, kinds, paths, settled = _merge_resolved(distinct, kinds, paths, settled, resolved,
                                                              options.cluster_tolerance)
        # each path ends at one root, mu paths at a root of multiplicity mu: another sum says a root was lost or
        # found twice (the member's count is undecided)
        unsure += abs(sum(p if kind == PointKind.RANK_DROP else 1 for p, kind in zip(paths, kinds)) - len(rows))
        distinct = np.array(distinct)
        real_value = real_family and np.all(np.abs(np.asarray(value).imag) == 0)
        undecided = np.zeros(len(distinct), dtype=bool)
        if real_value:
            # every path of the member ended at a finite point: no conjugate can be missing (decision 0104)
            real, undecided = judge_real(distinct, failed == 0 and infinite == 0, options.real_tolerance,
                                         options.real_separation)
        else:
            real = np.zeros(len(distinct), dtype=bool)
        for index, is_real in settled.items():  # decided at 40 digits
            real[index] = real_value and is_real
            undecided[index] = False
        members.append(MemberSolutions(value, distinct, real, kinds, np.array(paths, dtype=np.int64), failed, infinite,
                                       int(np.sum(undecided)) + unsure))
    return members


def _without_zero_at_infinity(family, value, endpoints, tolerance):
    """How many of a member's ``endpoints`` at infinity (homogeneous in x, X_0 first) have no zero of its
    top-degree forms in x near them (:func:`~numag.tracking.infinity.locate_at_infinity`).

    Examples
    --------
    >>> from numag.system.files import family_from_mapping
    >>> family = family_from_mapping({"variables": ["x"], "parameters": ["p"], "equations": ["p*x^2 + x - 1"]})
    >>> ends = np.array([[1e-9 + 0j, 1.0]])
    >>> _without_zero_at_infinity(family, [0.0], ends, 1e-6), _without_zero_at_infinity(family, [1.0], ends, 1e-6)
    (0, 1)
    """
    from ..tracking.infinity import locate_at_infinity  # loaded only where a sweep has ends at infinity
    n = family.n_variables
    forms = []
    for polynomial in family.system.polynomials:
        # the family's own top degree in x (a member's may be lower: then its whole hyperplane at infinity is a zero)
        degrees = polynomial.exponents[:, :n].sum(axis=1)
        keep = degrees == degrees.max() if len(degrees) else np.zeros(0, dtype=bool)
        forms.append(Polynomial(polynomial.exponents[keep], polynomial.coefficients[keep], polynomial.n_variables))
    top = Family(PolynomialSystem(family.system.variables, forms), family.parameters)
    with np.errstate(all="ignore"):  # a member's form may vanish identically: every direction is a zero
        located = locate_at_infinity(top.member(list(np.asarray(value))).polynomials, endpoints, tolerance)
    return int(np.sum(~np.isfinite(located.accuracy)))


def _merge_resolved(distinct, kinds, paths, settled, resolved, tolerance):
    """The member's points with each endpoint at a root found at 40 digits replaced by that root.

    ``resolved``: the index ranges of the roots found near the end of one path (:func:`split_cluster` without a
    count). Another path's endpoint is that root when it lies within ``tolerance`` of its size (the clustering's
    rule) and within half the distance to the other roots found there (so two close roots keep their own paths).
    """
    points = np.array(distinct)
    drop = set()
    for found in resolved:
        found = list(found)
        for index in found:
            others = [j for j in found if j != index]
            apart = min((np.linalg.norm(points[index] - points[j]) for j in others), default=np.inf)
            reach = min(tolerance * (1 + np.linalg.norm(points[index])), apart / 2)
            near = [j for j in range(len(points)) if j not in found and j not in drop and kinds[j] == PointKind.REGULAR
                    and paths[j] == 1 and np.linalg.norm(points[j] - points[index]) <= reach]
            drop.update(near[:1])
    keep = [j for j in range(len(points)) if j not in drop]
    renumber = {j: i for i, j in enumerate(keep)}
    return ([distinct[j] for j in keep], [kinds[j] for j in keep], [paths[j] for j in keep],
            {renumber[j]: v for j, v in settled.items() if j in renumber})


#: Digits of the arithmetic that pulls a cluster of endpoints apart (decision 0087): a member's parameter value is
#: a double, exact in binary, so its roots are resolved far below the double precision of the tracked endpoints.
_SPLIT_DIGITS = 40
#: A split root is accepted when its last Newton step is below this relative size (quadratic convergence at
#: a simple root reaches it in a few steps; at a true multiple root Newton is linear and never does).
_SPLIT_STEP = 1e-25
#: Clusters of more paths than this are left as they are (a rank drop).
_SPLIT_MAX_PATHS = 4
#: Clusters tried per sweep: a try costs about 0.05 s (one unknown) to 0.5 s (four), and a family whose every
#: member has a multiple root would otherwise pay it at every value; the rest stay rank drops, as before.
_SPLIT_TRIES = 64


def split_cluster(evaluator, point, value, paths):
    """The ``paths`` distinct solutions near ``point`` of the member at ``value``, or None if they are one point.

    Several paths of one member ending at one point mean either a member on the discriminant (a multiple
    root) or roots closer than double precision resolves at the end of the tracking (the member lies within
    about 1e-10 of the discriminant). The member's equations are reduced to one function of one unknown t
    along the null vector v of J_x at the point (Lyapunov-Schmidt reduction: the other n - 1 unknowns solve
    the other n - 1 equations by Newton for each t; common practice, no source), sampled on a circle of
    radius r at 40 digits. Where it winds ``paths`` times around 0 (exactly that many roots inside) and a
    polynomial of degree ``paths`` fits it, its roots start Newton on the member at 40 digits; the result
    is accepted only if every start converges quadratically and the limits are distinct.

    With ``paths=None`` the number of roots is not given: every root inside the first (largest) circle where
    the winding number is at most :data:`_SPLIT_MAX_PATHS` and the fit is clean is returned, each a simple
    root, or None if one of them is not (decision 0134: a single path the tracker ended at a rank drop).

    Parameters
    ----------
    evaluator : PrecisionEvaluator
        The family's incidence system in (x, p).
    point : ndarray of complex, shape (n,)
    value : ndarray of complex, shape (m,)
    paths : int or None

    Returns
    -------
    (ndarray of complex, shape (paths, n), ndarray of bool) or None
        The solutions, and which are real to 40 digits (only meaningful for a real member).

    Examples
    --------
    >>> from numag.system.parse import parse_system
    >>> cubic = PrecisionEvaluator(parse_system(["x^3 - 3*x + q"], ["x", "q"]).polynomials)
    >>> roots, real = split_cluster(cubic, np.array([1.0 + 0j]), np.array([2 - 2.0 ** -43]), 2)  # 1.1e-13 below 2
    >>> expected = np.array([-1, 1]) * 2.0 ** -21.5 / 3 ** 0.5  # 1 -+ sqrt(2^-43 / 3)
    >>> bool(np.allclose(np.sort(roots[:, 0].real) - 1, expected, rtol=1e-6, atol=0)), real.tolist()
    (True, [True, True])
    >>> split_cluster(cubic, np.array([1.0 + 0j]), np.array([2.0]), 2) is None  # on the discriminant: a double root
    True
    >>> roots, _ = split_cluster(cubic, np.array([1.0 + 0j]), np.array([2 - 2.0 ** -43]), None)  # count not given
    >>> len(roots)
    2
    """
    import mpmath

    n = len(point)
    if paths is not None and not 2 <= paths <= _SPLIT_MAX_PATHS:
        return None
    ctx = mpmath.mp
    with ctx.workdps(_SPLIT_DIGITS):
        parameters = [ctx.mpc(complex(v)) for v in value]

        def system(x):
            values, jacobian = evaluator.evaluate(list(x) + parameters, ctx)
            return values, jacobian[:, :n]

        _, jacobian = system([ctx.mpc(complex(z)) for z in point])
        matrix = np.array(jacobian.tolist(), dtype=complex)
        left, singular, right = np.linalg.svd(matrix)
        if n > 1 and singular[-2] <= 1e-6 * singular[0]:
            return None  # a kernel of two or more dimensions: not one function of one unknown
        null, others = right[-1].conj(), right[:-1].conj().T  # x = point + t null + others y
        left_others = left[:, :-1].conj().T  # the equations that fix y for each t
        start = [ctx.mpc(complex(z)) for z in point]

        def reduced(t, guess):
            """u^H F at the point of the slice t, with y solved by Newton; (value, y) or None."""
            y = list(guess)
            base = [start[j] + t * complex(null[j]) for j in range(n)]
            for _ in range(12):
                x = [base[j] + sum(complex(others[j, i]) * y[i] for i in range(n - 1)) for j in range(n)]
                values, jac = system(x)
                if n == 1:
                    break
                rows = [[sum(complex(left_others[a, b]) * jac[b, c] for b in range(n)) for c in range(n)]
                        for a in range(n - 1)]
                residual = ctx.matrix([sum(complex(left_others[a, b]) * values[b] for b in range(n))
                                       for a in range(n - 1)])
                reduced_jacobian = ctx.matrix([[sum(rows[a][c] * complex(others[c, i]) for c in range(n))
                                                for i in range(n - 1)] for a in range(n - 1)])
                try:
                    step = ctx.lu_solve(reduced_jacobian, residual)
                except ZeroDivisionError:
                    return None
                y = [y[i] - step[i] for i in range(n - 1)]
                if ctx.norm(step) <= ctx.eps * 1e3:
                    break
            values, _ = system(x)
            return sum(complex(left[b, -1].conjugate()) * values[b] for b in range(n)), y

        size = 1.0 + float(np.linalg.norm(point))
        samples = 8 * (paths or _SPLIT_MAX_PATHS)
        circle = np.exp(2j * np.pi * np.arange(samples) / samples)
        # endpoints cluster within 1e-6 of their size (SweepOptions.cluster_tolerance): the roots sought are that close
        for radius in size * 10.0 ** -np.arange(4.0, 12.5, 0.5):
            reached, guess = [], [ctx.mpc(0)] * (n - 1)
            for w in circle:
                found = reduced(ctx.mpf(radius) * complex(w), guess)
                if found is None:
                    return None
                reached.append(complex(found[0]))
                guess = found[1]
            reached = np.array(reached)
            if not np.all(np.isfinite(reached)) or not np.all(reached != 0):
                return None  # a value of 0 on the circle: a root on it, or a member with a curve of solutions there
            turns = np.angle(np.roll(reached, -1) / reached)
            winding = int(round(np.sum(turns) / (2 * np.pi)))
            wanted = paths or winding  # without a count: every root in the first circle that shows them
            if winding < wanted or winding <= 0:
                # the roots left the circle before a radius showed them alone; a negative winding is no count of
                # roots at all (the reduced function is not analytic there: a member with a curve of solutions)
                return None
            if winding > wanted or winding > _SPLIT_MAX_PATHS or wanted + 1 >= samples:
                continue  # other roots inside: a smaller circle
            coefficients = np.fft.fft(reached) / samples  # c_j = a_j r^j of the Taylor series
            head = np.max(np.abs(coefficients[:wanted + 1]))
            if np.max(np.abs(coefficients[wanted + 1:])) > 1e-3 * head:
                continue  # not yet a polynomial of degree `wanted` on this circle
            roots = np.roots(coefficients[:wanted + 1][::-1]) * radius
            refined = [_newton_on_member(system, [start[j] + complex(t * null[j]) for j in range(n)], ctx)
                       for t in roots]
            if any(r is None for r in refined):
                return None
            points = np.array([[complex(z) for z in r] for r in refined])
            exact_distance = [float(ctx.norm(ctx.matrix(refined[a]) - ctx.matrix(refined[b])))
                              for a in range(wanted) for b in range(a + 1, wanted)]
            if min(exact_distance, default=np.inf) <= 1e3 * _SPLIT_STEP * size:
                return None  # two starts reached one root
            real = np.array([max(abs(float(z.imag)) for z in r) <= _SPLIT_STEP * size for r in refined])
            return points, real
    return None


def _newton_on_member(system, start, ctx, iterations=15):
    """Newton on the member from ``start`` (mp); the point if the last step is below the accepted size.

    From the fitted roots Newton converges quadratically in a few steps; at a multiple root it is linear (each
    step halves the error), and 15 steps end it far above the accepted size.
    """
    x = ctx.matrix(start)
    for _ in range(iterations):
        values, jacobian = system(list(x))
        try:
            step = ctx.lu_solve(jacobian, values)
        except ZeroDivisionError:
            return None
        x = x - step
        if ctx.norm(step) <= _SPLIT_STEP * (1 + ctx.norm(x)):
            return list(x)
    return None


def real_by_separation(points, fraction=1e-3):
    """Which solutions of a real member are real, judged against their distance to the other solutions.

    The solutions of a real system are closed under conjugation: a non-real solution z has conj(z) among
    them, at distance 2 |Im z|, so its imaginary part is at least half its distance to the nearest other
    solution. A solution whose imaginary part is below ``fraction`` of that distance is therefore real, at
    any scale (no absolute or relative-to-the-origin tolerance; common practice, no source). Valid only when
    every solution of the member is given (no failed path: a lost conjugate would make its partner look real).

    Parameters
    ----------
    points : ndarray, shape (S, n)
        The distinct solutions of one real member.
    fraction : float

    Returns
    -------
    ndarray of bool, shape (S,)

    Examples
    --------
    >>> near_fold = np.array([[1 + 1e-7j], [1.001 - 1e-7j], [5 + 2j], [5 - 2j]])
    >>> real_by_separation(near_fold).tolist()
    [True, True, False, False]
    """
    points = np.atleast_2d(np.asarray(points, dtype=complex))
    if len(points) == 0:
        return np.zeros(0, dtype=bool)
    imaginary = np.linalg.norm(points.imag, axis=1)
    distance = np.linalg.norm(points[:, None, :] - points[None, :, :], axis=2)
    np.fill_diagonal(distance, np.inf)
    return imaginary <= fraction * distance.min(axis=1)


def judge_real(points, complete, tolerance=1e-8, fraction=1e-3):
    """Which solutions of a real member are real, which are not, and which cannot be told (decision 0104).

    The solutions of a real system are closed under conjugation. A solution is *real* when its imaginary part
    is below ``tolerance`` of its size (plus one: points are in balanced units), or, when the member is
    ``complete`` (every path ended at a finite point), below ``fraction`` of its distance to the nearest other
    solution (:func:`real_by_separation`). Any other solution is not real, so its conjugate must be among the
    solutions: another point nearer to conj(z) than a quarter of |z - conj(z)|, each the other's nearest. A
    non-real point without that partner is a contradiction (a conjugate lost: a path jumped onto a point at
    infinity that every member has, or a point too inaccurate to be told real): it is *undecided*, and so
    is the member's real count. With every non-real point paired, the real count has the parity of the number
    of solutions, as it must. Both tests compare distances within one member: scale-free, and unchanged by a
    real change of coordinates up to its condition (common practice, no source).

    Parameters
    ----------
    points : ndarray, shape (S, n)
        The distinct finite solutions of one real member.
    complete : bool
        Whether no path of the member failed or went to infinity.
    tolerance, fraction : float

    Returns
    -------
    real, undecided : ndarray of bool, shape (S,)

    Examples
    --------
    >>> pair = np.array([[2.6 + 0j, -2.4j], [2.6 + 0j, 2.4j]])
    >>> [flags.tolist() for flags in judge_real(pair, complete=True)]
    [[False, False], [False, False]]
    >>> [flags.tolist() for flags in judge_real(pair[:1], complete=False)]  # its conjugate was lost
    [[False], [True]]
    """
    points = np.atleast_2d(np.asarray(points, dtype=complex))
    if len(points) == 0:
        return np.zeros(0, dtype=bool), np.zeros(0, dtype=bool)
    real = np.all(np.abs(points.imag) <= tolerance * (1 + np.abs(points)), axis=1)
    if complete:
        # near the discriminant a real solution is computed only to about the square root of the precision:
        # its imaginary part sits at the fixed tolerance, and the count flipped with the seed
        real |= real_by_separation(points, fraction)
    to_conjugates = np.linalg.norm(points.conj()[:, None, :] - points[None, :, :], axis=2)
    np.fill_diagonal(to_conjugates, np.inf)
    partner = np.argmin(to_conjugates, axis=1)
    imaginary = np.linalg.norm(points.imag, axis=1)
    paired = (to_conjugates[np.arange(len(points)), partner] <= imaginary / 2) \
        & (partner[partner] == np.arange(len(points))) & ~real[partner]
    return real, ~real & ~paired


def _has_close_pair(points, tolerance):
    """Whether two of a few points lie within the relative tolerance (the quick test before clustering)."""
    difference = np.linalg.norm(points[:, None, :] - points[None, :, :], axis=2)
    scale = 1 + np.maximum(np.linalg.norm(points, axis=1)[:, None], np.linalg.norm(points, axis=1)[None, :])
    np.fill_diagonal(difference, np.inf)
    return bool(np.any(difference <= tolerance * scale))
